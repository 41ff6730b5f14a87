import { and, desc, eq, lte } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { planResultSchema, type PlanResult, type YardReportResult } from '@nightyard/contracts';
import { parseScenario } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { buses, depots, plans, runs } from '../db/schema';
import { nightOfDepot } from '../night/depot-night';
import { replanAndPublish, type PublishDeps } from './yard-service';

/**
 * A reading this many percentage points away from what the plan took re-plans the night. Below
 * it the plan stands: the chargers' readings and the buses' own gauges differ by a few points,
 * and a re-plan moves buses (common practice; no standard sets the figure).
 */
export const SOC_REPLAN_POINTS = 5;
/** A bus plugged in up to this long before its planned time is taken as that plug-in. */
const EARLY_MS = 30 * 60_000;

export type ChargerReadingOutcome =
  | { taken: false; why: string }
  | {
      taken: true;
      bus: string;
      socPct: number;
      plannedPct: number;
      arrival: boolean;
      revised: YardReportResult | null;
    };

/**
 * A state of charge read by a charger as a bus was plugged in. The bus is the one tonight's
 * published plan has on that charger now. When the plug-in is the bus's first of the night, the
 * reading becomes its arrival reading (source "charger"), replacing what was typed or estimated.
 * When it differs from what the plan took by more than SOC_REPLAN_POINTS, the rest of the night is
 * re-planned and published, as after a reading reported by the yard.
 */
export async function takeChargerReading(
  deps: PublishDeps,
  reading: { depotId: string; charger: string; socPct: number; at: Date },
): Promise<ChargerReadingOutcome> {
  const { db } = deps;
  const [depot] = await db.select().from(depots).where(eq(depots.id, reading.depotId));
  if (!depot) return { taken: false, why: 'the depot is gone' };
  const { tonight } = await nightOfDepot(db, depot, reading.at);
  const [plan] = await db
    .select()
    .from(plans)
    .where(and(eq(plans.depotId, depot.id), eq(plans.serviceDate, tonight.serviceDate), eq(plans.state, 'published')));
  if (!plan?.result) return { taken: false, why: `no plan is published for the night of ${tonight.serviceDate}` };
  const result = planResultSchema.parse(plan.result);
  const t = reading.at.getTime();
  const session = result.sessions
    .filter((s) => s.charger === reading.charger && Date.parse(s.start) - EARLY_MS <= t && t < Date.parse(s.end))
    .sort((a, b) => Date.parse(b.start) - Date.parse(a.start))[0];
  if (!session) return { taken: false, why: `the plan has no bus on charger ${reading.charger} at this time` };
  const parsed = parseScenario(plan.scenario);
  const bus = parsed.ok ? parsed.scenario.buses.find((b) => b.id === session.bus) : undefined;
  if (!bus) return { taken: false, why: `bus ${session.bus} is not in the plan's depot data` };

  const ofBus = result.sessions
    .filter((s) => s.bus === bus.id)
    .sort((a, b) => Date.parse(a.start) - Date.parse(b.start));
  const arrival = ofBus[0] === session;
  const plannedKwh =
    bus.arrivalKwh + (arrival ? 0 : deliveredBefore(ofBus, t, parsed.ok ? parsed.scenario.slotMinutes : 15));
  const plannedPct = Math.round((plannedKwh / bus.usableKwh) * 1000) / 10;
  if (!arrival && plan.includesMidday) {
    // Between runs the bus spends energy the plan only estimates: the reading is no measure of the plan there.
    return { taken: false, why: `bus ${bus.id}'s later plug-in on a plan with the midday layover` };
  }

  if (arrival)
    await storeArrivalReading(db, depot.id, tonight.serviceDate, bus.id, Date.parse(session.start), reading.socPct);
  let revised: YardReportResult | null = null;
  if (Math.abs(reading.socPct - plannedPct) > SOC_REPLAN_POINTS) {
    const zone = depot.timezone;
    revised = await replanAndPublish(
      deps,
      // A charger reports for its own depot only.
      {
        organisationId: depot.organisationId,
        id: null,
        name: `charger ${reading.charger}`,
        roles: [],
        depotIds: [depot.id],
      },
      depot.id,
      {
        kind: 'soc_reading',
        planId: plan.id,
        bus: bus.id,
        socPct: reading.socPct,
        reason: `Charger ${reading.charger} read ${reading.socPct} % at plug-in (${DateTime.fromJSDate(reading.at, { zone }).toFormat('HH:mm')}); the plan took ${plannedPct} %`,
      },
      reading.at,
    );
  }
  return { taken: true, bus: bus.id, socPct: reading.socPct, plannedPct, arrival, revised };
}

/** Energy the plan delivers to a bus before an instant (kWh), over its sessions in time order. */
function deliveredBefore(sessions: PlanResult['sessions'], t: number, slotMinutes: number): number {
  const slotMs = slotMinutes * 60_000;
  let kwh = 0;
  for (const s of sessions) {
    s.kw.forEach((kw, k) => {
      const from = Date.parse(s.start) + k * slotMs;
      const part = Math.min(1, Math.max(0, (t - from) / slotMs));
      kwh += kw * (slotMs / 3_600_000) * part;
    });
  }
  return kwh;
}

/** The run the bus came in from (its last pull-in up to the plug-in) takes the reading, marked as the charger's. */
async function storeArrivalReading(
  db: Db,
  depotId: string,
  serviceDate: string,
  busNumber: string,
  plugInMs: number,
  socPct: number,
) {
  const [bus] = await db
    .select({ id: buses.id })
    .from(buses)
    .where(and(eq(buses.depotId, depotId), eq(buses.number, busNumber)));
  if (!bus) return;
  const [run] = await db
    .select({ id: runs.id })
    .from(runs)
    .where(
      and(
        eq(runs.depotId, depotId),
        eq(runs.serviceDate, serviceDate),
        eq(runs.busId, bus.id),
        lte(runs.pullIn, new Date(plugInMs + EARLY_MS)),
      ),
    )
    .orderBy(desc(runs.pullIn))
    .limit(1);
  if (!run) return;
  await db.update(runs).set({ arrivalSocPct: socPct, arrivalSocSource: 'charger' }).where(eq(runs.id, run.id));
}
