// Unit factors of the network results (SI, BIPM 2019): lengths are stored in m and areas in m², and
// reported in km and km² where the laws are customarily stated in them (Hack 1957; Horton 1945).
export { M2_PER_KM2 } from "@/lib/hydro/channels";
/** metres in one kilometre */
export const M_PER_KM = 1000;
