// The summary of a drainage job: what was extracted, Horton's laws, and the laws and measures built on them.
import type { DrainageSummary } from "@/lib/pipelines/drainage";
import { HortonSection } from "@/components/jobs/horton-section";
import { formatCi, formatNumber } from "@/components/jobs/numbers";
import { Facts, type Fact } from "@/components/jobs/facts";

export function DrainageResult({ summary }: { summary: DrainageSummary }) {
  const { input, channels, network, basins, horton, dimension, hack, tokunaga, drainageDensity, params } = summary;
  const level = `${Math.round(params.confidence * 100)} %`;
  const facts: Fact[] = [
    { label: "Grid", value: `${input.width} × ${input.height} cells, ${input.validCells.toLocaleString("en")} valid` },
    { label: "Cell size", value: `${input.cellSizeM.map((v) => formatNumber(v, 4)).join(" × ")} m` },
    { label: "CRS", value: input.crs.epsg === null ? input.crs.name : `EPSG:${input.crs.epsg} (${input.crs.name})` },
    { label: "Channel threshold", value: `${formatNumber(channels.thresholdKm2, 4)} km² (${channels.method === "area" ? "fixed area" : "constant drop test"})` },
    { label: "Network", value: `${network.links} links, ${network.sources} sources, ${network.outlets} outlets` },
    { label: "Basins analysed", value: `${basins.count} (${basins.mode})` },
    { label: "Highest order Ω", value: String(horton.highestOrder) },
  ];
  const laws: Fact[] = [
    {
      label: <>Network dimension ln R<sub>B</sub> / ln R<sub>L</sub></>,
      value: dimension === null ? "—" : `${formatNumber(dimension.bounded, 4)}${dimension.clamped ? ` (computed ${formatNumber(dimension.raw, 4)}, bounded to [1, 2])` : ""}`,
    },
    {
      label: <>Hack&apos;s law L = C·A<sup>h</sup></>,
      value: hack === null
        ? "too few sub-basins"
        : `h = ${formatNumber(hack.exponent, 4)} (${level} CI ${formatCi(hack.exponentCi)}), C = ${formatNumber(hack.coefficientKm, 4)} km (CI ${formatCi(hack.coefficientCi)}), R² = ${formatNumber(hack.rSquared, 4)}; ${hack.pointsFitted} sub-basins of ${formatNumber(hack.minAreaKm2)}–${formatNumber(hack.maxAreaKm2)} km²; ${hack.units}`,
    },
    {
      label: <>Tokunaga T<sub>k</sub> = a·c<sup>k−1</sup></>,
      value: tokunaga.a === null || tokunaga.c === null
        ? "too few side-tributary classes"
        : `a = ${formatNumber(tokunaga.a, 4)} (CI ${formatCi(tokunaga.aCi)}), c = ${formatNumber(tokunaga.c, 4)} (CI ${formatCi(tokunaga.cCi)}), R² = ${formatNumber(tokunaga.rSquared, 4)}; k = ${tokunaga.kUsed.join(", ")}`,
    },
    {
      label: "Drainage density",
      value: `${formatNumber(drainageDensity.valuePerKm, 4)} km/km² (${formatNumber(drainageDensity.totalLengthKm, 4)} km of channel over ${formatNumber(drainageDensity.basinAreaKm2, 4)} km²)`,
    },
  ];
  return (
    <div className="flex flex-col gap-5">
      <Facts title="What was analysed" facts={facts} />
      <HortonSection
        bifurcation={horton.bifurcationRatio}
        length={horton.lengthRatio}
        area={horton.areaRatio}
        slope={horton.slopeRatio}
        confidence={params.confidence}
        rows={horton.table.map((r) => ({ order: r.order, streams: r.streamCount, meanLengthM: r.meanLengthM, meanAreaKm2: r.meanAreaKm2, meanSlope: r.meanSlope }))}
      />
      <Facts title="Laws and measures" facts={laws} />
    </div>
  );
}
