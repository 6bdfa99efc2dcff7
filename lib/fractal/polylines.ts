// Plain-coordinate polyline input shared by the line estimators: x,y interleaved Float64Arrays in lon/lat degrees
// (WGS84, RFC 7946 axis order) or in projected metres, and the one distance each kind of coordinate uses.
import { geodesicDistance } from "@/lib/raster/geodesy";

export type Coordinates = "lonlat" | "metres";

export interface Polylines {
  /** each polyline as x0, y0, x1, y1, … (lon, lat in degrees for "lonlat") */
  lines: Float64Array[];
  coordinates: Coordinates;
}

/** Checks the polylines once at a public function: even lengths, ≥ 2 vertices, finite numbers, lat in ±90. */
export function checkPolylines(input: Polylines): void {
  if (input.coordinates !== "lonlat" && input.coordinates !== "metres") {
    throw new RangeError(`coordinates must be "lonlat" or "metres", got ${String(input.coordinates)}`);
  }
  if (input.lines.length === 0) throw new RangeError("no polylines given");
  input.lines.forEach((line, k) => {
    if (line.length % 2 !== 0 || line.length < 4) {
      throw new RangeError(`polyline ${k} needs an even number of coordinates and at least 2 vertices, got ${line.length} numbers`);
    }
    for (let i = 0; i < line.length; i++) {
      if (!Number.isFinite(line[i])) throw new RangeError(`polyline ${k} has a non-finite coordinate at index ${i}`);
      if (input.coordinates === "lonlat" && i % 2 === 1 && Math.abs(line[i]) > 90) {
        throw new RangeError(`polyline ${k} has latitude ${line[i]} outside ±90°`);
      }
    }
  });
}

/** Distance in metres between two points: geodesic on WGS84 for lon/lat, Euclidean for projected metres. */
export function pointDistance(coordinates: Coordinates): (x1: number, y1: number, x2: number, y2: number) => number {
  return coordinates === "lonlat"
    ? geodesicDistance
    : (x1, y1, x2, y2) => Math.hypot(x2 - x1, y2 - y1);
}

/** Median length of the polylines' segments, m. */
export function medianSegmentLength(input: Polylines): number {
  const dist = pointDistance(input.coordinates);
  const lengths: number[] = [];
  for (const l of input.lines) for (let i = 2; i < l.length; i += 2) lengths.push(dist(l[i - 2], l[i - 1], l[i], l[i + 1]));
  lengths.sort((a, b) => a - b);
  return lengths[Math.floor(lengths.length / 2)];
}
