import type { Db } from '../db/client';
import { serviceDaysAround } from '../night/depot-night';
import { profileNightOf, type ProfileNight } from './charging-profiles';

/** How each of `serviceDates` binds its profiles (ids, stack levels, validity), from the depot's runs. */
export async function profileNightsOf(
  db: Db,
  depot: { id: string; timezone: string },
  serviceDates: string[],
): Promise<ProfileNight[]> {
  if (!serviceDates.length) return [];
  const sorted = [...serviceDates].sort();
  const days = await serviceDaysAround(db, depot.id, sorted[0]!);
  return serviceDates.map((d) => profileNightOf(days, depot.timezone, d));
}
