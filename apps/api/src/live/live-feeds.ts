import type { PlanSummary, YardReport } from '@nightyard/contracts';
import type { CentralSystem } from '../ocpp/central-system';
import type { Clock } from '../time/clock';
import type { LiveBus } from './live-bus';

/** Puts every charger state change the central system stores on the bus, as `charger` events. */
export function feedChargerStates(
  central: Pick<CentralSystem, 'onLiveChange'>,
  bus: LiveBus,
  clock: Clock,
): () => void {
  return central.onLiveChange((depotId, charger) =>
    bus.publish(depotId, { type: 'charger', at: clock().toISOString(), charger }),
  );
}

/** A plan published by a supervisor, or a revision published after a report. */
export function announcePlan(
  bus: LiveBus,
  plan: Pick<PlanSummary, 'id' | 'depotId' | 'serviceDate' | 'version'>,
  kind: 'published' | 'revised',
  now: Date,
): void {
  bus.publish(plan.depotId, {
    type: 'plan',
    at: now.toISOString(),
    planId: plan.id,
    serviceDate: plan.serviceDate,
    version: plan.version,
    kind,
  });
}

/** What the yard reported, in a line for the pages ("Dana reported charger C out of service"). */
export function reportNoticeText(by: string, report: YardReport): string {
  switch (report.kind) {
    case 'charger_out':
      return `${by} reported charger ${report.charger} out of service`;
    case 'bus_late':
      return `${by} reported bus ${report.bus} late, expected ${report.expectedAt.slice(11)}`;
    case 'bus_absent':
      return `${by} reported bus ${report.bus} absent tonight`;
    case 'soc_reading':
      return `${by} reported bus ${report.bus} at ${report.socPct} %`;
  }
}

export function announceReport(bus: LiveBus, depotId: string, by: string, report: YardReport, now: Date): void {
  bus.publish(depotId, {
    type: 'notice',
    at: now.toISOString(),
    kind: report.kind,
    text: reportNoticeText(by, report),
    charger: 'charger' in report ? report.charger : null,
    bus: 'bus' in report ? report.bus : null,
  });
}
