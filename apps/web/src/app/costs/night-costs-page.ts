import { ChangeDetectionStrategy, Component, computed, inject, input, resource } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { footedCents, footedEnergyDemand, toCents, type PlanCosts } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { baselineName } from '../plans/plan-format';
import { CostsApi } from './costs-api';
import { cents, kwh, longDay, money, num, percent } from './costs-format';
import { CsvExportButton } from './csv-export-button';
import type { CsvTable } from './csv';

/** One published night's projected cost: against its baseline, per bus and per mile. */
@Component({
  selector: 'ny-night-costs-page',
  imports: [CsvExportButton, MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink],
  templateUrl: './night-costs-page.html',
  styleUrls: ['./costs-panels.scss', './costs-table.scss', './night-costs-page.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class NightCostsPage {
  private readonly api = inject(CostsApi);

  /** The plan (route parameter). */
  readonly planId = input.required<string>();

  private readonly loaded = resource({ params: () => this.planId(), loader: ({ params: id }) => this.api.plan(id) });
  protected readonly costs = computed<PlanCosts | null>(() =>
    this.loaded.hasValue() ? (this.loaded.value() ?? null) : null,
  );
  protected readonly loading = this.loaded.isLoading;
  protected readonly problem = computed(() => {
    const err = this.loaded.error();
    return err ? toApiProblem(err).message : null;
  });

  protected readonly night = computed(() => {
    const p = this.costs();
    return p ? longDay(p.serviceDate) : null;
  });

  protected readonly facts = computed(() => {
    const p = this.costs();
    if (!p) return null;
    const c = p.currency;
    // The parts add up to the total shown (footedCents, the one rounding rule), and the saving is
    // the difference of the two energy figures shown, so no card is a cent off another.
    const { energy, demand } = footedEnergyDemand(p);
    const baselineEnergy = toCents(p.baseline.total - p.baseline.demand);
    const saving = baselineEnergy - energy;
    return {
      total: money(toCents(p.total), c),
      parts: `Energy ${money(energy, c)}, demand ${money(demand, c)}`,
      baselineName: baselineName(p.baseline.kind),
      // The night against its baseline on charging energy; demand is the period's (see Costs).
      baseline: money(baselineEnergy, c),
      baselineParts:
        `Charging energy, peak ${num(p.baseline.peakKw)} kW` +
        (p.baseline.shortfallKwh > 0.05
          ? `; ${num(p.baseline.shortfallKwh, 0)} kWh it would not deliver, counted at the plan's average price`
          : ''),
      otherBaseline: p.otherBaseline
        ? `${baselineName(p.otherBaseline.kind)}: ${money(p.otherBaseline.energy, c)}, peak ${num(p.otherBaseline.peakKw)} kW`
        : null,
      savings: money(saving, c),
      savingsShare: percent(p.savingsShare),
      savingsPositive: saving > 0,
      peaks: `The plan's peak ${num(p.peakKw)} kW against the baseline's ${num(p.baseline.peakKw)} kW`,
      charging: kwh(p.chargingKwh),
      miles: `${num(p.miles, 0)} miles`,
      perMile: p.costPerMile === null ? 'No miles' : money(p.costPerMile, c),
    };
  });

  protected readonly rows = computed(() => {
    const p = this.costs();
    if (!p) return [];
    const c = p.currency;
    // The buses' costs foot to the night's total to the cent (footedCents, the one rounding rule).
    const shown = footedCents(
      p.perBus.map((b) => b.cost),
      toCents(p.total),
    );
    return p.perBus.map((b, i) => ({
      bus: b.bus,
      kwh: num(b.kwh, 1),
      cost: money(shown[i]!, c),
      miles: num(b.miles, 1),
      perMile: b.costPerMile === null ? '—' : money(b.costPerMile, c),
    }));
  });

  protected readonly totals = computed(() => {
    const p = this.costs();
    if (!p) return null;
    const c = p.currency;
    // The same figure as the card: the night's total is the sum of its buses' unrounded costs.
    return {
      kwh: num(p.chargingKwh, 1),
      cost: money(toCents(p.total), c),
      miles: num(p.miles, 1),
      perMile: p.costPerMile === null ? '—' : money(p.costPerMile, c),
    };
  });

  protected readonly csv = computed<CsvTable>(() => {
    const p = this.costs();
    const c = p?.currency ?? 'USD';
    return {
      header: ['Bus', 'Charging (kWh)', `Cost (${c})`, 'Miles next service day', `Cost per mile (${c})`],
      rows: (() => {
        const shown = footedCents(
          (p?.perBus ?? []).map((b) => b.cost),
          toCents(p?.total ?? 0),
        );
        return (p?.perBus ?? []).map((b, i) => [
          b.bus,
          b.kwh,
          shown[i]!,
          b.miles,
          b.costPerMile === null ? null : cents(b.costPerMile),
        ]);
      })(),
    };
  });

  protected readonly fileName = computed(() => `costs-night-${this.costs()?.serviceDate ?? 'plan'}-buses.csv`);

  protected load(): void {
    this.loaded.reload();
  }
}
