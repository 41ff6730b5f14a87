import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { RouterLink } from '@angular/router';
import type { MonthCosts } from '@nightyard/contracts';
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

  protected readonly rows = computed(() => {
    const c = this.currency();
    return this.month().nights.map((n) => {
      const saving = n.baselineEnergyCost === null ? null : n.baselineEnergyCost - n.planEnergyCost;
      // A partly metered night is compared over its metered intervals only.
      const partial = n.actualSiteEnergyCost !== null && !fullyMetered(n);
      const against = fullyMetered(n) ? n.projectedSiteEnergyCost : partial ? n.projectedMeteredSiteEnergyCost : null;
      const diff = against === null || n.actualSiteEnergyCost === null ? null : n.actualSiteEnergyCost - against;
      return {
        planId: n.planId,
        date: n.date,
        day: shortDay(n.date),
        version: n.version,
        planEnergy: money(n.planEnergyCost, c),
        baselineEnergy: n.baselineEnergyCost === null ? null : money(n.baselineEnergyCost, c),
        baselineName: n.baselineKind ? baselineName(n.baselineKind).toLowerCase() : null,
        saving: saving === null ? null : money(saving, c),
        savingClass: saving === null ? '' : saving > SAME ? 'saving' : saving < -SAME ? 'over' : '',
        baselinePeak: n.baselinePeakKw === null ? null : kw(n.baselinePeakKw),
        projected: money(n.projectedSiteEnergyCost, c),
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
    const nights = this.month().nights;
    const c = this.currency();
    const sum = (f: (n: MonthCosts['nights'][number]) => number) => nights.reduce((a, n) => a + f(n), 0);
    // Totals from the unrounded figures; the saving over the nights that have a baseline.
    const compared = nights.filter((n) => n.baselineEnergyCost !== null);
    const plan = sum((n) => n.planEnergyCost);
    const baseline = compared.reduce((a, n) => a + n.baselineEnergyCost!, 0);
    return {
      planEnergy: money(plan, c),
      baselineEnergy: money(baseline, c),
      saving: money(baseline - compared.reduce((a, n) => a + n.planEnergyCost, 0), c),
      projected: money(sum((n) => n.projectedSiteEnergyCost), c),
    };
  });

  protected readonly csv = computed<CsvTable>(() => {
    const c = this.currency();
    return {
      header: [
        'Night', 'Plan version', `Charging energy, planned (${c})`, 'Baseline', `Charging energy, baseline (${c})`, `Energy saving (${c})`,
        `Projected site energy cost (${c})`, `Metered site energy cost (${c})`, `Metered minus projected (${c})`,
        'Projected peak (kW)', 'Baseline peak (kW)', 'Metered peak (kW)', 'Metered share of the night (%)',
      ],
      rows: this.month().nights.map((n) => [
        n.date, n.version, cents(n.planEnergyCost), n.baselineKind ? baselineName(n.baselineKind) : null,
        n.baselineEnergyCost === null ? null : cents(n.baselineEnergyCost),
        n.baselineEnergyCost === null ? null : cents(n.baselineEnergyCost - n.planEnergyCost),
        cents(n.projectedSiteEnergyCost), n.actualSiteEnergyCost === null ? null : cents(n.actualSiteEnergyCost),
        fullyMetered(n) ? cents(n.actualSiteEnergyCost! - n.projectedSiteEnergyCost) : null,
        n.projectedPeakKw, n.baselinePeakKw, n.actualPeakKw, Math.round(n.actualCoverage * 1000) / 10,
      ]),
    };
  });
}
