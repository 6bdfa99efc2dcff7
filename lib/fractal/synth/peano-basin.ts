// Peano basin: Marani, Rigon & Rinaldo (1991), A note on fractal channel networks, WRR 27(12):3041–3049.
// Built by replacement (the rule as recalled, from memory): every link becomes two links of half its length
// with a new source joining at the midpoint, and every source forks into two new sources. Its topology
// is the Tokunaga tree with T_k = 2^(k−1) (Tarboton 1996, J. Hydrol. 187 — memory), so R_L = 2 exactly
// and R_B, R_A → 4. The paper's exact space-filling lattice planform is not reproduced: this layout
// places the new links at right angles on a lattice and lets some vertices coincide.
import { StreamNetwork } from "@/lib/network/model";
import { SyntheticNetworkBuilder } from "./network-builder";

/** links grow by 4× per generation: 10 gives about 1.4 million */
const MAX_GENERATIONS = 10;

export interface PeanoBasinParams {
  /** replacement steps; generation g has Strahler order g + 1 */
  generations: number;
  /** length of every link after the last step, m; default 1 */
  linkLengthM?: number;
}

export function peanoBasin(params: PeanoBasinParams): StreamNetwork {
  const { generations } = params;
  const unit = params.linkLengthM ?? 1;
  if (!Number.isInteger(generations) || generations < 0 || generations > MAX_GENERATIONS) {
    throw new RangeError(`generations must be an integer in 0…${MAX_GENERATIONS}, got ${generations}`);
  }
  if (!(unit > 0)) throw new RangeError(`linkLengthM must be positive, got ${unit}`);
  // generation 0: one link from (0, 1) down to the outlet at (0, 0), on an integer lattice
  let x0 = Int32Array.of(0), y0 = Int32Array.of(1), x1 = Int32Array.of(0), y1 = Int32Array.of(0);
  let down = Int32Array.of(-1), source = Uint8Array.of(1);
  for (let g = 1; g <= generations; g++) {
    const n = down.length;
    const first = new Int32Array(n); // id of link l's lower half; upper half, side source and forks follow
    let total = 0;
    for (let l = 0; l < n; l++) { first[l] = total; total += source[l] ? 5 : 3; }
    const nx0 = new Int32Array(total), ny0 = new Int32Array(total), nx1 = new Int32Array(total), ny1 = new Int32Array(total);
    const nDown = new Int32Array(total), nSource = new Uint8Array(total);
    const side = g % 2 === 1 ? 1 : -1; // alternating sides keeps the planform from folding onto itself
    const put = (id: number, ax: number, ay: number, bx: number, by: number, into: number, isSource: number) => {
      nx0[id] = ax; ny0[id] = ay; nx1[id] = bx; ny1[id] = by; nDown[id] = into; nSource[id] = isSource;
    };
    for (let l = 0; l < n; l++) {
      const ax = 2 * x0[l], ay = 2 * y0[l], bx = 2 * x1[l], by = 2 * y1[l];
      const mx = (ax + bx) / 2, my = (ay + by) / 2;
      const px = (-(ay - by) / 2) * side, py = ((ax - bx) / 2) * side; // unit lattice step across the link
      const lower = first[l], upper = lower + 1;
      // the lower half keeps l's downstream end, which is the upstream end of the upper half of l's outflow
      put(lower, mx, my, bx, by, down[l] < 0 ? -1 : first[down[l]] + 1, 0);
      put(upper, ax, ay, mx, my, lower, 0);
      put(lower + 2, mx + px, my + py, mx, my, lower, 1);
      if (source[l]) {
        put(lower + 3, ax + px, ay + py, ax, ay, upper, 1);
        put(lower + 4, ax - px, ay - py, ax, ay, upper, 1);
      }
    }
    x0 = nx0; y0 = ny0; x1 = nx1; y1 = ny1; down = nDown; source = nSource;
  }
  const builder = new SyntheticNetworkBuilder();
  for (let l = 0; l < down.length; l++) builder.add(x0[l] * unit, y0[l] * unit, x1[l] * unit, y1[l] * unit, down[l], unit);
  return builder.build();
}
