// Tokunaga (1978), Geophys. Bull. Hokkaido Univ. 25:1–19; Peckham (1995), WRR 31(4):1023–1029: the self-similar
// tree in which every stream of order ω receives T_k = a·c^(k−1) side tributaries of order ω − k.
import { StreamNetwork } from "@/lib/network/model";
import { SyntheticNetworkBuilder } from "./network-builder";

/** Turn between a stream and its side tributaries, and half the angle of the fork at a stream's head.
 *  The planform is schematic (branches may cross); no estimator here reads the coordinates. */
const SIDE_ANGLE = Math.PI / 3;
const FORK_HALF_ANGLE = Math.PI / 6;
/** tolerance for accepting a·c^(k−1) as a whole number of tributaries */
const INTEGER_TOLERANCE = 1e-9;
/** 4^Ω links: order 12 already gives about 11 million */
const MAX_ORDER = 12;

export interface TokunagaTreeParams {
  a: number;
  c: number;
  /** Ω, the order of the outlet stream */
  order: number;
  /** length of every link, m; default 1 (unit links) */
  linkLengthM?: number;
}

/** The Tokunaga (a, c) tree of order Ω with equal links. Side tributaries join the highest order
 *  nearest the outlet. Areas follow SYNTHETIC_AREA_PER_LENGTH_M (upstream channel length × 1 m). */
export function tokunagaTree(params: TokunagaTreeParams): StreamNetwork {
  const { a, c, order } = params;
  const linkLength = params.linkLengthM ?? 1;
  if (!Number.isInteger(order) || order < 1 || order > MAX_ORDER) {
    throw new RangeError(`order must be an integer in 1…${MAX_ORDER}, got ${order}`);
  }
  if (!(linkLength > 0)) throw new RangeError(`linkLengthM must be positive, got ${linkLength}`);
  const tk: number[] = [];
  for (let k = 1; k < order; k++) {
    const t = a * c ** (k - 1);
    if (!(t >= 0) || Math.abs(t - Math.round(t)) > INTEGER_TOLERANCE) {
      throw new RangeError(`T_${k} = a·c^${k - 1} = ${t} is not a whole number of tributaries; a tree needs integer T_k`);
    }
    tk.push(Math.round(t));
  }
  const builder = new SyntheticNetworkBuilder();

  // Links are laid from the outlet upstream: link m spans P(m+1) → P(m) and flows into link m − 1; a
  // side tributary joins at P(m) and flows into link m − 1 too; the two forming streams join at P(n).
  const addStream = (w: number, x: number, y: number, angle: number, downstream: number): void => {
    const sides: number[] = [];
    for (let k = 1; k < w; k++) for (let j = 0; j < tk[k - 1]; j++) sides.push(w - k);
    const ux = linkLength * Math.cos(angle), uy = linkLength * Math.sin(angle);
    const ids: number[] = [];
    for (let m = 0; m <= sides.length; m++) {
      ids.push(builder.add(x + (m + 1) * ux, y + (m + 1) * uy, x + m * ux, y + m * uy, m === 0 ? downstream : ids[m - 1], linkLength));
    }
    sides.forEach((sideOrder, i) => {
      const m = i + 1, turn = i % 2 === 0 ? SIDE_ANGLE : -SIDE_ANGLE;
      addStream(sideOrder, x + m * ux, y + m * uy, angle + turn, ids[m - 1]);
    });
    if (w > 1) {
      const n = sides.length + 1, head = ids[n - 1];
      addStream(w - 1, x + n * ux, y + n * uy, angle + FORK_HALF_ANGLE, head);
      addStream(w - 1, x + n * ux, y + n * uy, angle - FORK_HALF_ANGLE, head);
    }
  };
  addStream(order, 0, 0, Math.PI / 2, -1);
  return builder.build();
}
