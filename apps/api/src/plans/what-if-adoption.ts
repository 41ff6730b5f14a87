import { and, eq } from 'drizzle-orm';
import { longDate } from '@nightyard/contracts';
import type { AdoptedPlan, WhatIfAdoption } from '@nightyard/contracts';
import { parseScenario, type Scenario } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { chargers, plans } from '../db/schema';
import { DomainError, conflict, notFound } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { assertMayOpenDepot, depotOf } from '../depots/depot-access';
import type { JobQueue } from '../jobs/job-queue';
import { nightOfDepot } from '../night/depot-night';
import { prepareNight, storeDraft } from './plans-service';
import { whatIfDifferences } from './what-if-differences';

const NOTHING_CHANGED = 'Nothing was changed.';

/**
 * Re-checks a what-if (a study) against the depot as it is now: builds the night from the depot's
 * chargers in service, service limit, rate plan, buses and runs, with the study's own choice (the
 * midday layover or not), and lists what differs. Refused (409) for anything but a finished
 * what-if, for a night that has ended, and when the depot's data no longer makes a plannable night.
 */
async function recheck(db: Db, caller: AuthUser, id: string, now: Date) {
  const [plan] = await db
    .select()
    .from(plans)
    .where(and(eq(plans.id, id), eq(plans.organisationId, caller.organisationId)));
  if (!plan) throw notFound('That plan');
  assertMayOpenDepot(caller, plan.depotId, 'That plan');
  if (plan.kind !== 'what-if')
    throw conflict(
      `Version ${plan.version} is not a what-if: only a what-if is adopted. Review and publish this version as it is.`,
    );
  if (plan.status !== 'done') {
    throw conflict(
      plan.status === 'failed'
        ? `What-if version ${plan.version} could not be generated, so there is nothing to adopt: upload the scenario again. ${NOTHING_CHANGED}`
        : `What-if version ${plan.version} is not finished yet: wait until it has been generated, then adopt it.`,
    );
  }
  const depot = await depotOf(db, caller, plan.depotId);
  const parsed = parseScenario(plan.scenario);
  if (!parsed.ok)
    throw conflict(
      `What-if version ${plan.version} cannot be re-checked: its scenario file no longer reads as a scenario. ${NOTHING_CHANGED}`,
    );
  const study = parsed.scenario;
  if (study.timezone !== depot.timezone) {
    throw conflict(
      `What-if version ${plan.version} cannot be re-checked: it is for ${study.timezone}, ${depot.name} is now in ${depot.timezone}. ${NOTHING_CHANGED}`,
    );
  }
  const night = await nightOfDepot(db, depot, now);
  const nightText = longDate(plan.serviceDate);
  if (plan.serviceDate < night.tonight.serviceDate) {
    throw conflict(
      `The night of ${nightText} has ended: what-if version ${plan.version} can no longer be adopted. Upload a scenario for a night to come. ${NOTHING_CHANGED}`,
    );
  }
  const includesMidday = study.buses.some((b) => b.stays.length > 1);
  let prepared: Awaited<ReturnType<typeof prepareNight>>;
  try {
    prepared = await prepareNight(db, caller, plan.depotId, plan.serviceDate, includesMidday, now);
  } catch (err) {
    if (!(err instanceof DomainError) || err.code !== 'validation_failed') throw err;
    const ended = err.fields?.['serviceDate'] === 'The night is over';
    throw conflict(
      ended
        ? `${err.message}: what-if version ${plan.version} can no longer be adopted. ${NOTHING_CHANGED}`
        : `What-if version ${plan.version} cannot be re-checked against ${depot.name} as it is now: ${err.message}. ${NOTHING_CHANGED}`,
    );
  }
  const current = parseScenario(prepared.scenario);
  if (!current.ok)
    throw conflict(
      `What-if version ${plan.version} cannot be re-checked: the depot's data does not make a plannable night. ${NOTHING_CHANGED}`,
    );
  const depotChargers = await db
    .select({ label: chargers.label, status: chargers.status, statusReason: chargers.statusReason })
    .from(chargers)
    .where(eq(chargers.depotId, plan.depotId));
  const adoption: WhatIfAdoption = {
    whatIf: { id: plan.id, version: plan.version },
    serviceDate: plan.serviceDate,
    includesMidday,
    differences: whatIfDifferences(study, current.scenario as Scenario, depotChargers),
  };
  return { plan, prepared, adoption };
}

/** What adopting the what-if would change, without changing anything. */
export async function whatIfAdoption(db: Db, caller: AuthUser, id: string, now: Date): Promise<WhatIfAdoption> {
  return (await recheck(db, caller, id, now)).adoption;
}

/**
 * Adopts a what-if: a new normal draft of its night, generated from the depot as it is now with the
 * study's choices where they still apply; the differences head its notes. The what-if stays a study.
 */
export async function adoptWhatIf(
  db: Db,
  jobs: JobQueue,
  caller: AuthUser,
  id: string,
  now: Date,
): Promise<AdoptedPlan> {
  const { plan, prepared, adoption } = await recheck(db, caller, id, now);
  const count = adoption.differences.length;
  const notes = [
    `Adopted from what-if version ${plan.version}, re-checked against the depot as it is now: ` +
      (count
        ? `${count === 1 ? '1 difference' : `${count} differences`} from the study, the depot's data used.`
        : 'the study still matched the depot.'),
    ...adoption.differences.map((d) => `Differs from the study: ${d}.`),
    ...prepared.notes,
  ];
  const draft = await storeDraft(db, jobs, caller, plan.depotId, plan.serviceDate, {
    kind: 'generated',
    ...prepared,
    notes,
    createdAt: now,
  });
  return { plan: draft, adoption };
}
