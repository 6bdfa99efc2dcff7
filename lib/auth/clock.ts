// Time as a dependency: services take a Clock so tests can move past grace periods and expiries.
export interface Clock {
  now(): Date;
}

export const systemClock: Clock = { now: () => new Date() };

export function fixedClock(at: Date): Clock & { advance(ms: number): void } {
  let t = at.getTime();
  return { now: () => new Date(t), advance: (ms) => void (t += ms) };
}
