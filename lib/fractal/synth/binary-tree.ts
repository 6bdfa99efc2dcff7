// The complete binary tree of order Ω (every junction joins two links of equal order), whose Horton
// bifurcation ratio is exactly 2 (derived: N_ω = 2^(Ω−ω)); laid out as an H-tree (Mandelbrot 1982, ch. 17).
import { StreamNetwork } from "@/lib/network/model";
import { SyntheticNetworkBuilder } from "./network-builder";

/** 2^Ω − 1 links: order 22 gives four million */
const MAX_ORDER = 22;

export interface BinaryTreeParams {
  order: number;
  /** length of the outlet link, m; default 2^(Ω−1), so the source links are 1 m */
  outletLengthM?: number;
  /** ratio of a link's length to that of each of its two inflows; default 2. Above √2 the H-tree
   *  planform never crosses itself. */
  lengthRatio?: number;
}

export function binaryTree(params: BinaryTreeParams): StreamNetwork {
  const { order } = params;
  if (!Number.isInteger(order) || order < 1 || order > MAX_ORDER) {
    throw new RangeError(`order must be an integer in 1…${MAX_ORDER}, got ${order}`);
  }
  const ratio = params.lengthRatio ?? 2;
  const outletLength = params.outletLengthM ?? ratio ** (order - 1);
  if (!(ratio > 0) || !(outletLength > 0)) throw new RangeError("link lengths and their ratio must be positive");
  const builder = new SyntheticNetworkBuilder();
  // Iterative on an explicit stack: (order, downstream end x, y, direction unit vector, length, into)
  const stack: [number, number, number, number, number, number, number][] = [[order, 0, 0, 0, 1, outletLength, -1]];
  while (stack.length > 0) {
    const [w, x, y, ux, uy, length, into] = stack.pop()!;
    const x0 = x + ux * length, y0 = y + uy * length;
    const id = builder.add(x0, y0, x, y, into, length);
    if (w > 1) {
      // the two inflows leave the junction at right angles, as in an H
      stack.push([w - 1, x0, y0, -uy, ux, length / ratio, id], [w - 1, x0, y0, uy, -ux, length / ratio, id]);
    }
  }
  return builder.build();
}
