// The published methods each job kind composes, cited by name and paper in its provenance document. The
// citations are the ones the pipeline and method modules name on their first lines (lib/pipelines/*.ts).
import type { MethodCitation } from "@/lib/provenance/prov-json";

const NETWORK_LAWS: MethodCitation[] = [
  { name: "Strahler stream order", citation: "Strahler (1957), Trans. AGU 38(6):913–920" },
  { name: "Horton's laws of stream numbers and lengths", citation: "Horton (1945), Geol. Soc. Am. Bull. 56(3):275–370" },
  { name: "Hack's law", citation: "Hack (1957), USGS Prof. Paper 294-B" },
  { name: "Tokunaga self-similarity", citation: "Tokunaga (1978), Geophys. Bull. Hokkaido Univ. 25:1–19" },
  { name: "Network fractal dimension", citation: "Tarboton, Bras & Rodríguez-Iturbe (1988), WRR 24(8):1317–1322" },
];

const LINE_DIMENSIONS: MethodCitation[] = [
  { name: "Divider (ruler) dimension", citation: "Richardson (1961), General Systems Yearbook 6:139–187; Mandelbrot (1967), Science 156:636–638" },
  { name: "Box-counting dimension", citation: "Falconer (2003), Fractal Geometry, 2nd ed., §3.1" },
];

export const METHODS_OF_KIND: Record<string, readonly MethodCitation[]> = {
  drainage: [
    { name: "Priority-Flood depression filling", citation: "Barnes, Lehman & Mulla (2014), Computers & Geosciences 62:117–127" },
    { name: "Flat resolution", citation: "Barnes, Lehman & Mulla (2014), Computers & Geosciences 62:128–135" },
    { name: "D8 flow directions", citation: "O'Callaghan & Mark (1984), CVGIP 28(3):323–344" },
    ...NETWORK_LAWS,
    { name: "Drainage density", citation: "Horton (1945), Geol. Soc. Am. Bull. 56(3):275–370" },
  ],
  surface: [
    { name: "Semivariogram dimension", citation: "Mark & Aronson (1984), Math. Geol. 16(7):671–683" },
    { name: "Differential box counting", citation: "Sarkar & Chaudhuri (1994), IEEE Trans. Syst. Man Cybern. 24(1):115–120" },
    { name: "Power spectrum dimension", citation: "Huang & Turcotte (1989), J. Geophys. Res. 94(B6):7491–7495" },
    { name: "Triangular prism surface area", citation: "Clarke (1986), Computers & Geosciences 12(5):713–722" },
  ],
  network: [
    { name: "Shreve magnitude", citation: "Shreve (1966), J. Geol. 74(1):17–37" },
    ...NETWORK_LAWS,
    ...LINE_DIMENSIONS,
  ],
  line: LINE_DIMENSIONS,
};
