import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { RouterLink } from '@angular/router';
import type { MonthCosts } from '@nightyard/contracts';
import { cents, fullyMetered, kw, money, monthKey, percent, shortDay, signedMoney } from './costs-format';
import { CsvExportButton } from './csv-export-button';
import type { CsvTable } from './csv';

/** Metered cost within this of the projection counts as "as planned" (rounding). */
const SAME = 0.005;

/**
 * The billing period's published nights: what each plan costs against unmanaged charging, and the
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
      const saving = n.baselineCost - n.planCost;
      const diff = fullyMetered(n) ? n.actualSiteEnergyCost! - n.projectedSiteEnergyCost : null;
      return {
        planId: n.planId,
        date: n.date,
        day: shortDay(n.date),
        version: n.version,
        planCost: money(n.planCost, c),
        baselineCost: money(n.baselineCost, c),
        saving: money(saving, c),
        savingClass: saving > SAME ? 'saving' : saving < -SAME ? 'over' : '',
        projected: money(n.projectedSiteEnergyCost, c),
        actual: n.actualSiteEnergyCost === null ? null : money(n.actualSiteEnergyCost, c),
        partial: n.actualSiteEnergyCost !== null && !fullyMetered(n),
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
    const plan = sum((n) => n.planCost);
    const baseline = sum((n) => n.baselineCost);
    return {
      planCost: money(plan, c),
      baselineCost: money(baseline, c),
      saving: money(baseline - plan, c),
      projected: money(sum((n) => n.projectedSiteEnergyCost), c),
    };
  });

  protected readonly csv = computed<CsvTable>(() => {
    const c = this.currency();
    return {
      header: [
        'Night', 'Plan version', `Plan cost (${c})`, `Unmanaged charging cost (${c})`, `Saving (${c})`,
        `Projected site energy cost (${c})`, `Metered site energy cost (${c})`, `Metered minus projected (${c})`,
        'Projected peak (kW)', 'Metered peak (kW)', 'Metered share of the night (%)',
      ],
      rows: this.month().nights.map((n) => [
        n.date, n.version, cents(n.planCost), cents(n.baselineCost), cents(n.baselineCost - n.planCost),
        cents(n.projectedSiteEnergyCost), n.actualSiteEnergyCost === null ? null : cents(n.actualSiteEnergyCost),
        fullyMetered(n) ? cents(n.actualSiteEnergyCost! - n.projectedSiteEnergyCost) : null,
        n.projectedPeakKw, n.actualPeakKw, Math.round(n.actualCoverage * 1000) / 10,
      ]),
    };
  });
}
