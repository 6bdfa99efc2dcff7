// The summary of a network job (mapped stream lines): topology, Horton's laws, and the laws built on them.
import type { NetworkSummary } from "@/lib/pipelines/network";
import { Facts, type Fact } from "@/components/jobs/facts";
import { HortonSection } from "@/components/jobs/horton-section";
import { formatCi, formatNumber } from "@/components/jobs/numbers";
import { M2_PER_KM2 } from "@/lib/network/units";

export function NetworkResult({ summary }: { summary: NetworkSummary }) {
  const { input, network, horton, dimension, hack, tokunaga, drainageDensity, params } = summary;
  const facts: Fact[] = [
    { label: "Lines read", value: `${input.lines} lines in ${input.features} features` },
    { label: "CRS", value: input.crs.epsg === null ? input.crs.name : `EPSG:${input.crs.epsg} (${input.crs.name})` },
    { label: "Network", value: `${network.links} links, ${network.sources} sources, ${network.outlets} outlets, ${formatNumber(network.totalLengthM / 1000, 4)} km` },
    { label: "Highest order Ω", value: String(network.highestOrder) },
    { label: "Areas from", value: summary.areaBasis },
  ];
  const laws: Fact[] = [
    { label: "Network dimension", value: "reason" in dimension ? dimension.reason : `${formatNumber(dimension.bounded, 4)} (${dimension.formula})` },
    {
      label: <>Hack&apos;s law L = C·A<sup>h</sup></>,
      value: "exponent" in hack
        ? `h = ${formatNumber(hack.exponent, 4)} (CI ${formatCi(hack.exponentCi)}), C = ${formatNumber(hack.coefficientKm, 4)} km, R² = ${formatNumber(hack.rSquared, 4)}, ${hack.pointsFitted} sub-basins`
        : hack.reason,
    },
    {
      label: <>Tokunaga T<sub>k</sub> = a·c<sup>k−1</sup></>,
      value: tokunaga.a === null || tokunaga.c === null
        ? "too few side-tributary classes"
        : `a = ${formatNumber(tokunaga.a, 4)} (CI ${formatCi(tokunaga.aCi)}), c = ${formatNumber(tokunaga.c, 4)} (CI ${formatCi(tokunaga.cCi)})`,
    },
    {
      label: "Drainage density",
      value: drainageDensity === null ? "no basin outline given" : `${formatNumber(drainageDensity.valuePerKm, 4)} km/km² (${drainageDensity.basinAreaFrom})`,
    },
  ];
  return (
    <div className="flex flex-col gap-5">
      <Facts title="What was analysed" facts={facts} />
      <HortonSection
        bifurcation={horton.bifurcation}
        length={horton.length}
        area={horton.area}
        slope={horton.slope}
        confidence={params.confidence}
        rows={summary.orders.map((o) => ({
          order: o.order, streams: o.streams, meanLengthM: o.meanLengthM,
          meanAreaKm2: o.meanAreaM2 === null ? null : o.meanAreaM2 / M2_PER_KM2, meanSlope: o.meanSlope,
        }))}
      />
      <Facts title="Laws and measures" facts={laws} />
    </div>
  );
}
