// How often the drainage loops look at their AbortSignal (common practice: poll between chunks of work).

/** Cells between two looks inside a per-cell loop: about a millisecond of work at the rates measured
 *  (10⁷–10⁸ cells/s), so a cancel is honoured promptly and the check costs nothing measurable. */
export const ABORT_CHECK_CELLS = 1 << 20;
/** Rows between two looks inside a row loop: 256 rows of a 4096-wide grid are also about 10⁶ cells. */
export const ABORT_CHECK_ROWS = 256;
