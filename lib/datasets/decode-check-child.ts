// Entry of the decode-check child (started through lib/ingest/sandbox.ts): decodes every block of a compressed
// GeoTIFF with the bounded readers, so a decompression bomb or a corrupt stream is refused at upload, not in a job.
// Answers the elevation range and the count of valid cells, which the dataset keeps as metadata.
import { serveOneRequest } from "@/lib/ingest/sandbox-child";
import { readDem } from "@/lib/raster/read-geotiff";

export interface DecodeCheckRequest {
  path: string;
  epsg?: number;
  cellBudget: number;
}

export interface DecodeCheck {
  validCells: number;
  elevationRangeM: [number, number] | null;
}

serveOneRequest(async (request) => {
  const r = request as DecodeCheckRequest;
  const { data } = (await readDem(r.path, { epsg: r.epsg, cellBudget: r.cellBudget })).elevation;
  let valid = 0, lo = Infinity, hi = -Infinity;
  for (let i = 0; i < data.length; i++) {
    const z = data[i];
    if (z !== z) continue; // NaN = nodata (lib/raster/grid.ts)
    valid++;
    if (z < lo) lo = z;
    if (z > hi) hi = z;
  }
  return { validCells: valid, elevationRangeM: valid > 0 ? [lo, hi] : null } satisfies DecodeCheck;
});
