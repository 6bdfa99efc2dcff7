// Small DEMs shared by the hydro tests: written out or made from a seeded generator, never stored.
import { makeGrid, type Grid } from "@/lib/raster/grid";

/** A Float32 grid from rows written north first. */
export function gridOf(rows: number[][]): Grid<Float32Array> {
  return makeGrid(Float32Array.from(rows.flat()), rows[0].length, rows.length);
}

/** Deterministic pseudo-random numbers in [0, 1) (mulberry32), so a failing case can be replayed. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A rough random DEM (0–100 m, in 0.1 m steps when `rounded`, which makes ties and flats common)
 *  with a fraction of nodata holes. */
export function randomDem(w: number, h: number, seed: number, holeFraction: number, rounded = true): Grid<Float32Array> {
  const rnd = seededRandom(seed);
  const data = new Float32Array(w * h);
  for (let i = 0; i < data.length; i++) {
    const hole = rnd() < holeFraction;
    const v = rnd() * 100;
    data[i] = hole ? NaN : rounded ? Math.round(v * 10) / 10 : v;
  }
  return makeGrid(data, w, h);
}

/** A plane falling at unit slope towards azimuth `thetaDeg`, measured from east towards north, on
 *  cells dx × dy m (rows run south, so north is −y). */
export function plane(w: number, h: number, thetaDeg: number, dx = 1, dy = 1): Grid<Float32Array> {
  const t = (thetaDeg * Math.PI) / 180;
  const data = new Float32Array(w * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) data[y * w + x] = 1000 - (Math.cos(t) * x * dx - Math.sin(t) * y * dy);
  }
  return makeGrid(data, w, h);
}

/** The grid turned 90° clockwise on the map: the old west column becomes the new north row. */
export function rotateClockwise<T extends Float32Array | Uint8Array>(grid: Grid<T>): Grid<T> {
  const { data, width: w, height: h } = grid;
  const out = new (data.constructor as { new (n: number): T })(w * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) out[x * h + (h - 1 - y)] = data[y * w + x];
  }
  return { data: out, width: h, height: w };
}

/** A 9×7 DEM: a level interior at 5 m inside a 9 m rim broken by one outlet cell at (0, 3). */
export function flatWithOneOutlet(): Grid<Float32Array> {
  const w = 9, h = 7;
  const data = new Float32Array(w * h).fill(9);
  for (let y = 1; y < h - 1; y++) for (let x = 1; x < w - 1; x++) data[y * w + x] = 5;
  data[3 * w] = 5;
  return makeGrid(data, w, h);
}
