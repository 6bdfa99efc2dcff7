// Koch curve (von Koch 1904, Arkiv för Matematik, Astronomi och Fysik 1): each segment replaced by four of a third its
// length, the middle two forming a 60° peak; D = ln 4 / ln 3 (derived).

/** The Koch curve of `level` substitutions from (0, 0) to (length, 0), x,y interleaved; 4^level segments. */
export function kochCurve(level: number, length = 1): Float64Array {
  if (!Number.isInteger(level) || level < 0 || level > 10) throw new RangeError(`level must be an integer in [0, 10], got ${level}`);
  const n = 4 ** level;
  const out = new Float64Array(2 * (n + 1));
  // direction of segment i: the sum of the turns of its base-4 digits (0: 0°, 1: +60°, 2: −60°, 3: 0°)
  const turn = [0, 1, -1, 0];
  const seg = length / 3 ** level;
  let x = 0, y = 0;
  for (let i = 0; i < n; i++) {
    let t = 0;
    for (let k = i, d = 0; d < level; d++, k = Math.floor(k / 4)) t += turn[k % 4];
    const a = (t * Math.PI) / 3;
    x += seg * Math.cos(a); y += seg * Math.sin(a);
    out[2 * i + 2] = x; out[2 * i + 3] = y;
  }
  return out;
}
