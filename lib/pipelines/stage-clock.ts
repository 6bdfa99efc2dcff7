// Stage bookkeeping shared by the pipelines: the abort check between stages, progress reported at each
// stage's start fraction, and wall-clock seconds per stage, kept apart from the deterministic summary.

export interface StageHooks {
  onProgress?(stage: string, fraction: number): void;
  signal?: AbortSignal;
}

export function stageClock<S extends string>(startFractions: Record<S, number>, hooks: StageHooks) {
  const timingsS: Partial<Record<S, number>> = {};
  // a stage's share of the run ends where the next stage (in the object's order) starts, the last at 1
  const starts = Object.values<number>(startFractions);
  const endOf = (name: S) => starts[Object.keys(startFractions).indexOf(name) + 1] ?? 1;
  let current: S | null = null, started = 0;
  const close = () => {
    if (current) timingsS[current] = (performance.now() - started) / 1000;
    current = null;
  };
  return {
    timingsS,
    /** ends the running stage and starts `name` (throws if the run was aborted) */
    stage(name: S): void {
      hooks.signal?.throwIfAborted();
      close();
      current = name; started = performance.now();
      hooks.onProgress?.(name, startFractions[name]);
    },
    /** reports `fraction` (0–1) of stage `name` done, as a share of the whole run */
    within(name: S, fraction: number): void {
      hooks.onProgress?.(name, startFractions[name] + (endOf(name) - startFractions[name]) * fraction);
    },
    /** ends the last stage and reports completion */
    done(): void {
      close();
      hooks.onProgress?.("done", 1);
    },
  };
}
