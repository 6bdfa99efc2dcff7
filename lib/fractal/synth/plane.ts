// A tilted plane z = z0 + gx·x + gy·y (x east, y south, in cells): the surface of dimension exactly 2 (derived).
import { makeGrid, type Grid } from "@/lib/raster/grid";

export function plane(width: number, height: number, options: { z0?: number; gx?: number; gy?: number } = {}): Grid<Float32Array> {
  const { z0 = 0, gx = 0, gy = 0 } = options;
  const z = new Float32Array(width * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) z[y * width + x] = z0 + gx * x + gy * y;
  return makeGrid(z, width, height);
}
