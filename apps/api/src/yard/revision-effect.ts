import { toCents, type PlanResult, type YardReportResult } from '@nightyard/contracts';

export type RevisionEffect = YardReportResult['effect'];

const peakOf = (r: Pick<PlanResult, 'slots'>) => Math.max(0, ...r.slots.map((s) => s.loadKw));

/**
 * What a yard's revision does to the night, against the plan the yard was following: its projected
 * cost and demand charge (both whole nights, so they compare), its peak, and the buses it leaves
 * short. A charger lost in the small hours can raise the month's demand charge by hundreds: the
 * yard's result and every e-mail say so, so the supervisor can act on it.
 */
export function revisionEffect(before: PlanResult, after: PlanResult, currency: string): RevisionEffect {
  const figures = {
    costBefore: toCents(before.cost.total),
    costAfter: toCents(after.cost.total),
    demandBefore: toCents(before.cost.demand),
    demandAfter: toCents(after.cost.demand),
    peakBeforeKw: Math.round(peakOf(before) * 10) / 10,
    peakAfterKw: Math.round(peakOf(after) * 10) / 10,
    short: after.buses
      .filter((b) => b.shortfallKwh > 0.05)
      .map((b) => ({ bus: b.id, kwh: Math.round(b.shortfallKwh * 10) / 10, cause: b.cause ?? null })),
  };
  // The change from the unrounded totals, as Compare gives it (from the cents shown it can be a
  // cent off: $64.20 to $62.64 is $1.55 lower when the totals were $64.196 and $62.645).
  return { ...figures, lines: effectLines(figures, after.cost.total - before.cost.total, currency) };
}

/** The effect in words: one line for the money, one per short bus. */
function effectLines(e: Omit<RevisionEffect, 'lines'>, costChange: number, currency: string): string[] {
  const money = (v: number) => new Intl.NumberFormat('en-US', { style: 'currency', currency }).format(v);
  const lines: string[] = [];
  const change = toCents(costChange);
  if (Math.abs(change) >= 0.005) {
    const demand =
      Math.abs(e.demandAfter - e.demandBefore) >= 0.005
        ? ` (demand charge ${money(e.demandBefore)} before, ${money(e.demandAfter)} now; peak ${e.peakBeforeKw} kW before, ${e.peakAfterKw} kW now)`
        : '';
    lines.push(
      `The night's projected cost is ${money(Math.abs(change))} ${change > 0 ? 'higher' : 'lower'}: ${money(e.costAfter)}, was ${money(e.costBefore)}${demand}.`,
    );
  } else lines.push(`The night's projected cost is unchanged: ${money(e.costAfter)}.`);
  for (const s of e.short)
    lines.push(`Bus ${s.bus} leaves ${s.kwh} kWh short of what its runs need${s.cause ? `: ${s.cause}` : ''}.`);
  return lines;
}
