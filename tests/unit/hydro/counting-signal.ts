// A cancellation probe shared by the hydro and pipeline cancellation tests.

/**
 * A real AbortSignal whose `throwIfAborted` counts its calls and aborts its controller at call number
 * `abortAt` (never while it is 0; it may be set later), so a run is cancelled in the middle of whatever
 * loop made that check. `stackAtAbort` tells which function made it.
 */
export function countingSignal(abortAt = 0) {
  const controller = new AbortController();
  const signal = controller.signal;
  const probe = { checks: 0, abortAt, stackAtAbort: "", signal, reason: new Error("cancelled by the test") };
  const original = signal.throwIfAborted.bind(signal);
  signal.throwIfAborted = () => {
    probe.checks++;
    if (probe.checks === probe.abortAt) {
      probe.stackAtAbort = new Error().stack ?? "";
      controller.abort(probe.reason);
    }
    original();
  };
  return probe;
}
