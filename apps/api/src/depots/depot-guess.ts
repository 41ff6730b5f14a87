import type { depots } from '../db/schema';

/** What a guess needs: the depot's zone and billing day (the rest of the row is read by the query). */
type DepotGuess = Pick<typeof depots.$inferSelect, 'id' | 'timezone' | 'billingStartDay'>;

/**
 * The depot rows last read, per id, for the hottest routes (Tonight, the costs month) to guess
 * the depot's zone and billing day before their one query. The guess only shapes the query: the
 * same query reads the depot itself (scoped to the caller's organisation), and the route checks
 * the row against its guess and asks again when they differ, so nothing here can go stale.
 */
const lastSeen = new Map<string, DepotGuess>();
const MAX_DEPOTS = 500;

export function rememberDepot(depot: DepotGuess): void {
  lastSeen.delete(depot.id);
  lastSeen.set(depot.id, { id: depot.id, timezone: depot.timezone, billingStartDay: depot.billingStartDay });
  while (lastSeen.size > MAX_DEPOTS) lastSeen.delete(lastSeen.keys().next().value!);
}

export function guessDepot(depotId: string): DepotGuess | undefined {
  return lastSeen.get(depotId);
}
