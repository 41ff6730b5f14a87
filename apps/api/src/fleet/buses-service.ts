import { and, asc, eq } from 'drizzle-orm';
import type { Bus, BusInput } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { buses } from '../db/schema';
import { DomainError, notFound } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';

type Row = typeof buses.$inferSelect;

export const toBus = (b: Row): Bus => ({
  id: b.id,
  number: b.number,
  usableKwh: b.usableKwh,
  maxChargeKw: b.maxChargeKw,
  connector: b.connector,
  kwhPerMile: b.kwhPerMile,
  ceilingPct: b.ceilingPct,
  reservePct: b.reservePct,
  taperStartPct: b.taperStartPct,
  status: b.status,
});

export async function listBuses(db: Db, caller: AuthUser, depotId: string): Promise<Bus[]> {
  await depotOf(db, caller, depotId);
  const rows = await db.select().from(buses).where(eq(buses.depotId, depotId)).orderBy(asc(buses.number));
  return rows.map(toBus);
}

function duplicateNumber(err: unknown): never {
  const code = (err as { code?: string }).code ?? (err as { cause?: { code?: string } }).cause?.code;
  if (code === '23505')
    throw new DomainError('conflict', 'This depot already has a bus with that number', {
      number: 'Already used in this depot',
    });
  throw err;
}

export async function createBus(db: Db, caller: AuthUser, depotId: string, input: BusInput): Promise<Bus> {
  await depotOf(db, caller, depotId);
  const [row] = await db
    .insert(buses)
    .values({ ...input, organisationId: caller.organisationId, depotId })
    .returning()
    .catch(duplicateNumber);
  return toBus(row!);
}

export async function updateBus(db: Db, caller: AuthUser, depotId: string, id: string, input: BusInput): Promise<Bus> {
  await depotOf(db, caller, depotId);
  const [row] = await db
    .update(buses)
    .set(input)
    .where(and(eq(buses.id, id), eq(buses.depotId, depotId)))
    .returning()
    .catch(duplicateNumber);
  if (!row) throw notFound('That bus');
  return toBus(row);
}
