// The one in-memory grid shape of the numerical core: row-major, north row first, indexed y * width + x.
export type CellArray =
  | Float32Array | Float64Array | Int8Array | Uint8Array | Int16Array | Uint16Array | Int32Array | Uint32Array;

export interface Grid<T extends CellArray = Float32Array> {
  data: T;
  width: number;
  height: number;
}

/** Nodata rule of the core, in one place: elevations are Float32 and a missing cell is NaN
 *  (readers turn the file's nodata value into NaN), so `z !== z` is the whole test. */
export function isNodata(z: number): boolean {
  return z !== z;
}

export function makeGrid<T extends CellArray>(data: T, width: number, height: number): Grid<T> {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width <= 0 || height <= 0) {
    throw new RangeError(`grid size must be positive integers, got ${width}×${height}`);
  }
  if (data.length !== width * height) {
    throw new RangeError(`grid data has ${data.length} cells, expected ${width}×${height} = ${width * height}`);
  }
  return { data, width, height };
}
