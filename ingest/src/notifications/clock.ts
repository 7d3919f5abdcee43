/**
 * The time the rules and notifications reason with. Injected so tests can move it (a fault
 * series of a night, quiet hours until morning) without waiting; timers still run on real time.
 */
export interface Clock {
  now(): Date;
}

export const systemClock: Clock = { now: () => new Date() };

/** Injection token for {@link Clock}. */
export const CLOCK = Symbol('CLOCK');
