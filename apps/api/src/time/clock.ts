/**
 * The one source of "now" for the API, the job worker, the seed and the station simulator.
 * Nothing else reads the wall clock: everything that needs the time is handed a Clock.
 *
 * Outside production a fixed starting instant can be set (NIGHTYARD_NOW, an ISO instant with an
 * offset, e.g. 2026-12-09T00:02:00-06:00) so development and the browser tests stand at the same
 * moment of the depot's night whatever the machine's date, hour or time zone. Time then runs on
 * from that instant at the normal pace, so durations (tokens, throttles, polling) still behave.
 */
export type Clock = () => Date;

/** The machine's clock. */
// eslint-disable-next-line no-restricted-syntax -- the one place allowed to read the wall clock
export const systemClock: Clock = () => new Date();

/** A clock that starts at `start` and runs on at the normal pace from the moment it is made. */
export function clockFrom(start: Date, wall: Clock = systemClock): Clock {
  const offset = start.getTime() - wall().getTime();
  return () => new Date(wall().getTime() + offset);
}

/** A clock stopped at one instant (tests move it by hand). */
export function fixedClock(at: Date | string): Clock {
  const t = typeof at === 'string' ? Date.parse(at) : at.getTime();
  if (!Number.isFinite(t)) throw new Error(`Not an instant: ${String(at)}`);
  return () => new Date(t);
}

/**
 * The clock the process runs on: the system clock, or NIGHTYARD_NOW's instant running on when set
 * outside production. A malformed value stops start-up with a message rather than running at the
 * wrong time.
 */
export function clockFromEnv(env: NodeJS.ProcessEnv = process.env): Clock {
  const fixed = env.NIGHTYARD_NOW?.trim();
  if (!fixed) return systemClock;
  if (env.NODE_ENV === 'production')
    throw new Error('NIGHTYARD_NOW is for development and tests only: unset it in production');
  const t = Date.parse(fixed);
  if (!/[zZ]|[+-]\d\d:?\d\d$/.test(fixed) || !Number.isFinite(t)) {
    throw new Error(
      `NIGHTYARD_NOW must be an ISO instant with an offset (e.g. 2026-12-09T00:02:00-06:00), not "${fixed}"`,
    );
  }
  return clockFrom(new Date(t));
}

/** A clock the browser tests can move (NODE_ENV=test only): it runs on from each instant set. */
export function adjustableClock(start: Clock): { clock: Clock; set(at: Date): void } {
  let current = start;
  return { clock: () => current(), set: (at) => (current = clockFrom(at)) };
}
