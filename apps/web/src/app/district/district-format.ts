import { shownSum, type DistrictDepot, type DistrictOverview } from '@nightyard/contracts';
import { kw, money, num, periodLabel, shortDay } from '../costs/costs-format';

/** One depot of the District overview, as shown (a table row on a laptop, a card on a phone). */
export interface DistrictRow {
  id: string;
  name: string;
  night: string;
  /** The plan's state in words ("Published, version 3", "Draft, not published", "No plan yet"). */
  planState: string;
  planTone: 'ok' | 'attention' | 'none';
  short: string;
  shortTone: 'ok' | 'attention';
  peak: string;
  /** Peak against the service limit, 0-100 (null without a plan). */
  peakShare: number | null;
  overLimit: boolean;
  cost: string;
  /** The billing period ("December 2026") and its rate plan; null without a rate plan. */
  period: string | null;
  ratePlan: string | null;
  billToDate: string;
  projectedBill: string;
  facilityPeak: string;
  target: string | null;
}

export interface DistrictView {
  rows: DistrictRow[];
  totals: { tonightCost: string; shortBuses: string; billToDate: string; projectedBill: string };
}

const DASH = '–';

function planState(t: DistrictDepot['tonight']): Pick<DistrictRow, 'planState' | 'planTone'> {
  switch (t.planState) {
    case 'published':
      return { planState: `Published${t.planVersion ? `, version ${t.planVersion}` : ''}`, planTone: 'ok' };
    case 'draft':
      return { planState: 'Draft, not published', planTone: 'attention' };
    default:
      return { planState: 'No plan yet', planTone: 'none' };
  }
}

function shortText(t: DistrictDepot['tonight']): string {
  if (t.planState === 'none') return DASH;
  if (t.shortBuses === 0) return 'None';
  const buses = t.shortBuses === 1 ? '1 bus' : `${t.shortBuses} buses`;
  return `${buses}, ${num(t.shortKwh)} kWh short`;
}

/**
 * The overview as shown. Each depot's figures stand on their own (each also on that depot's
 * Tonight and Costs), so they are rounded once each and the totals add up what is shown
 * (`shownSum`, the money rule's third case).
 */
export function districtView(o: DistrictOverview): DistrictView {
  const c = o.currency;
  const rows = o.depots.map((d): DistrictRow => {
    const t = d.tonight;
    const p = d.period;
    const share = t.peakKw !== null && t.serviceLimitKw > 0 ? (t.peakKw / t.serviceLimitKw) * 100 : null;
    return {
      id: d.depot.id,
      name: d.depot.name,
      night: shortDay(t.serviceDate),
      ...planState(t),
      short: shortText(t),
      shortTone: t.shortBuses > 0 ? 'attention' : 'ok',
      peak: t.peakKw !== null ? `${kw(t.peakKw)} of ${kw(t.serviceLimitKw)}` : `${DASH} of ${kw(t.serviceLimitKw)}`,
      peakShare: share === null ? null : Math.min(100, share),
      overLimit: share !== null && share > 100 + 1e-9,
      cost: t.cost !== null ? money(t.cost, c) : DASH,
      period: p ? periodLabel(p.start, p.end) : null,
      ratePlan: p?.ratePlanName ?? null,
      billToDate: p ? money(p.billToDate, c) : DASH,
      projectedBill: p ? money(p.projectedBill, c) : DASH,
      facilityPeak: p ? kw(p.peakKw) : DASH,
      target: p && p.targetKw !== null ? kw(p.targetKw) : null,
    };
  });
  const shortBuses = o.depots.reduce((n, d) => n + d.tonight.shortBuses, 0);
  return {
    rows,
    totals: {
      tonightCost: money(shownSum(o.depots.map((d) => d.tonight.cost)), c),
      shortBuses: shortBuses === 0 ? 'None' : shortBuses === 1 ? '1 bus' : `${shortBuses} buses`,
      billToDate: money(shownSum(o.depots.map((d) => d.period?.billToDate ?? null)), c),
      projectedBill: money(shownSum(o.depots.map((d) => d.period?.projectedBill ?? null)), c),
    },
  };
}
