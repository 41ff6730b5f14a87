import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { RouterLink } from '@angular/router';
import { shownSum, toCents, type MonthCosts } from '@nightyard/contracts';
import { baselineName } from '../plans/plan-format';
import { cents, fullyMetered, kw, money, monthKey, percent, shortDay, signedMoney } from './costs-format';
import { CsvExportButton } from './csv-export-button';
import type { CsvTable } from './csv';

/** Metered cost within this of the projection counts as "as planned" (rounding). */
const SAME = 0.005;

/**
 * The billing period's published nights: each plan's charging energy cost against its baseline's
 * (demand is the period's, shown on the savings card), and the
 * site's energy cost over the plan's hours as projected and as metered. Each night links to its
 * costs per bus and per mile.
 */
@Component({
  selector: 'ny-nights-table',
  imports: [CsvExportButton, RouterLink],
  changeDetection: ChangeDetectionStrategy.OnPush,
  templateUrl: './nights-table.html',
  styleUrl: './costs-table.scss',
})
export class NightsTable {
  readonly month = input.required<MonthCosts>();

  protected readonly currency = computed(() => this.month().currency);
  protected readonly fileName = computed(() => `costs-nights-${monthKey(this.month().period.start)}.csv`);

  /**
   * The money columns as shown: each night's figures are rounded on their own, as on Tonight,
   * Plans and the night's page, and each column's total is the sum of what it shows (`shownSum`,
   * rule 3 of the one rounding rule); a night's saving is its shown baseline minus its shown plan,
   * so rows and columns both add up.
   */
  private readonly shown = computed(() => {
    const nights = this.month().nights;
    const plan = nights.map((n) => toCents(n.planEnergyCost));
    const baseline = nights.map((n) => (n.baselineEnergyCost === null ? null : toCents(n.baselineEnergyCost)));
    const saving = nights.map((_, i) =>
      baseline[i] === null ? null : Math.round((baseline[i]! - plan[i]!) * 100) / 100,
    );
    const projected = nights.map((n) => toCents(n.projectedSiteEnergyCost));
    return {
      plan,
      baseline,
      saving,
      projected,
      totals: {
        plan: shownSum(plan),
        baseline: shownSum(baseline),
        saving: shownSum(saving),
        projected: shownSum(projected),
      },
    };
  });

  protected readonly rows = computed(() => {
    const c = this.currency();
    const shown = this.shown();
    return this.month().nights.map((n, i) => {
      const saving = shown.saving[i] ?? null;
      // A partly metered night is compared over its metered intervals only.
      const partial = n.actualSiteEnergyCost !== null && !fullyMetered(n);
      const against = fullyMetered(n) ? n.projectedSiteEnergyCost : partial ? n.projectedMeteredSiteEnergyCost : null;
      const diff = against === null || n.actualSiteEnergyCost === null ? null : n.actualSiteEnergyCost - against;
      return {
        planId: n.planId,
        date: n.date,
        day: shortDay(n.date),
        version: n.version,
        // Billed by interval: a night across the period's edge is split there, plan and baseline alike.
        part:
          n.periodPart === 'end'
            ? 'to the end of this billing period; the rest of the night is in the next'
            : n.periodPart === 'start'
              ? 'from the start of this billing period; the night began in the one before'
              : null,
        planEnergy: money(shown.plan[i]!, c),
        baselineEnergy: shown.baseline[i] === null ? null : money(shown.baseline[i]!, c),
        baselineName: n.baselineKind ? baselineName(n.baselineKind).toLowerCase() : null,
        saving: saving === null ? null : money(saving, c),
        savingClass: saving === null ? '' : saving > SAME ? 'saving' : saving < -SAME ? 'over' : '',
        baselinePeak: n.baselinePeakKw === null ? null : kw(n.baselinePeakKw),
        projected: money(shown.projected[i]!, c),
        actual: n.actualSiteEnergyCost === null ? null : money(n.actualSiteEnergyCost, c),
        partial,
        diff: diff === null ? null : signedMoney(cents(diff), c),
        diffClass: diff === null ? '' : diff > SAME ? 'over' : diff < -SAME ? 'saving' : '',
        projectedPeak: kw(n.projectedPeakKw),
        actualPeak: n.actualPeakKw === null ? null : kw(n.actualPeakKw),
        coverage: n.actualCoverage > 0 ? percent(n.actualCoverage) : null,
      };
    });
  });

  protected readonly totals = computed(() => {
    const c = this.currency();
    // Each column's total is the sum of the nights as shown.
    const t = this.shown().totals;
    return {
      planEnergy: money(t.plan, c),
      baselineEnergy: money(t.baseline, c),
      saving: money(t.saving, c),
      // Coloured by the rows' rule: a total that is a loss reads as one.
      savingClass: t.saving > SAME ? 'saving' : t.saving < -SAME ? 'over' : '',
      projected: money(t.projected, c),
    };
  });

  protected readonly csv = computed<CsvTable>(() => {
    const c = this.currency();
    return {
      header: [
        'Night',
        'Plan version',
        `Charging energy, planned (${c})`,
        'Baseline',
        `Charging energy, baseline (${c})`,
        `Energy saving (${c})`,
        `Projected site energy cost (${c})`,
        `Metered site energy cost (${c})`,
        `Metered minus projected (${c})`,
        'Projected peak (kW)',
        'Baseline peak (kW)',
        'Metered peak (kW)',
        'Metered share of the night (%)',
        'Part of the night in this period',
      ],
      rows: this.month().nights.map((n, i) => [
        n.date,
        n.version,
        this.shown().plan[i]!,
        n.baselineKind ? baselineName(n.baselineKind) : null,
        this.shown().baseline[i] ?? null,
        this.shown().saving[i] ?? null,
        this.shown().projected[i]!,
        n.actualSiteEnergyCost === null ? null : cents(n.actualSiteEnergyCost),
        fullyMetered(n) ? cents(n.actualSiteEnergyCost! - n.projectedSiteEnergyCost) : null,
        n.projectedPeakKw,
        n.baselinePeakKw,
        n.actualPeakKw,
        Math.round(n.actualCoverage * 1000) / 10,
        n.periodPart === 'end'
          ? "to the period's end"
          : n.periodPart === 'start'
            ? "from the period's start"
            : 'whole night',
      ]),
    };
  });
}
