import { ChangeDetectionStrategy, Component, ElementRef, computed, input, signal, viewChild } from '@angular/core';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { shownSum, type MonthCosts } from '@nightyard/contracts';
import {
  BarController,
  BarElement,
  CategoryScale,
  Legend,
  LinearScale,
  Tooltip,
  type ChartData,
  type ChartOptions,
} from 'chart.js';
import { BaseChartDirective, provideCharts } from 'ng2-charts';
import { injectThemeColours } from '../shared/theme-colours';
import { cents, fullyMetered, money, monthKey, shortDay, wholeMoney } from './costs-format';
import { CsvExportButton } from './csv-export-button';
import type { CsvTable } from './csv';

/**
 * The projected site energy to set beside the metered one: over the metered intervals alone on a
 * partly metered night (plans made before that figure existed: the whole night), the whole
 * night otherwise.
 */
export function projectedAgainstMeter(n: MonthCosts['nights'][number]): number | null {
  if (n.actualSiteEnergyCost === null) return n.projectedSiteEnergyCost;
  return fullyMetered(n) ? n.projectedSiteEnergyCost : (n.projectedMeteredSiteEnergyCost ?? n.projectedSiteEnergyCost);
}

/** Which pair of figures the chart compares. */
export type NightsView = 'savings' | 'metered';

type Colours = Record<'plan' | 'baseline' | 'projected' | 'metered' | 'text' | 'grid', string>;
const FALLBACK: Colours = {
  plan: '#0d6b5e',
  baseline: '#c78a12',
  projected: '#4a635e',
  metered: '#c78a12',
  text: '#3f4946',
  grid: '#bfc9c5',
};

let nextId = 0;

/**
 * The nights of a billing period as grouped bars: charging energy cost planned and under the night's baseline, or the
 * site's energy cost as projected against as metered. Described in words for screen readers, with
 * the same figures as a table under it.
 */
@Component({
  selector: 'ny-nights-chart',
  imports: [BaseChartDirective, CsvExportButton, MatButtonToggleModule],
  providers: [
    provideCharts({ registerables: [BarController, BarElement, CategoryScale, LinearScale, Legend, Tooltip] }),
  ],
  changeDetection: ChangeDetectionStrategy.OnPush,
  templateUrl: './nights-chart.html',
  styleUrls: ['./costs-table.scss', './nights-chart.scss'],
})
export class NightsChart {
  readonly month = input.required<MonthCosts>();

  protected readonly id = `ny-nights-chart-${nextId++}`;
  protected readonly view = signal<NightsView>('savings');
  private readonly probes = viewChild<ElementRef<HTMLElement>>('probes');
  /** A canvas cannot use CSS variables: the theme's colours are read from styled probes. */
  private readonly colours = injectThemeColours<keyof Colours>(this.probes, FALLBACK);

  protected readonly currency = computed(() => this.month().currency);
  protected readonly nights = computed(() => this.month().nights);

  /** The two series of the chosen view. */
  private readonly series = computed(() => {
    const nights = this.nights();
    const c = this.colours();
    return this.view() === 'savings'
      ? [
          { label: 'Charging energy, planned', colour: c.plan, data: nights.map((n) => n.planEnergyCost) },
          { label: 'Charging energy, baseline', colour: c.baseline, data: nights.map((n) => n.baselineEnergyCost) },
        ]
      : [
          // A partly metered night is compared over its metered intervals only.
          {
            label: 'Site energy, projected (over the metered intervals)',
            colour: c.projected,
            data: nights.map(projectedAgainstMeter),
          },
          { label: 'Site energy, metered', colour: c.metered, data: nights.map((n) => n.actualSiteEnergyCost) },
        ];
  });

  protected readonly data = computed<ChartData<'bar', (number | null)[], string>>(() => {
    // A few nights: keep each night's two bars side by side rather than spread over the width.
    const categoryPercentage = Math.min(0.8, Math.max(0.12, this.nights().length * 0.1));
    return {
      labels: this.nights().map((n) => shortDay(n.date)),
      datasets: this.series().map((s) => ({
        label: s.label,
        data: s.data,
        backgroundColor: s.colour,
        borderColor: s.colour,
        borderWidth: 0,
        categoryPercentage,
        barPercentage: 0.9,
        maxBarThickness: 40,
      })),
    };
  });

  protected readonly options = computed<ChartOptions<'bar'>>(() => {
    const c = this.colours();
    const currency = this.currency();
    return {
      responsive: true,
      maintainAspectRatio: false,
      animation: false,
      interaction: { mode: 'index', intersect: false },
      plugins: {
        legend: { position: 'bottom', labels: { color: c.text, boxWidth: 14 } },
        tooltip: {
          callbacks: {
            label: (ctx) =>
              `${ctx.dataset.label}: ${ctx.raw === null ? 'no meter data' : money(Number(ctx.raw), currency)}`,
          },
        },
      },
      scales: {
        x: { ticks: { color: c.text, maxRotation: 0, autoSkip: true, autoSkipPadding: 8 }, grid: { display: false } },
        y: {
          beginAtZero: true,
          title: { display: true, text: currency, color: c.text },
          ticks: { color: c.text, callback: (v) => wholeMoney(Number(v), currency) },
          grid: { color: c.grid },
        },
      },
    };
  });

  protected readonly label = computed(() =>
    this.view() === 'savings'
      ? 'Bar chart: charging energy cost of each night, planned and under its baseline'
      : 'Bar chart: site energy cost of each night, projected and metered',
  );

  /** The chart in words: the canvas's description. */
  protected readonly summary = computed(() => {
    const nights = this.nights();
    const c = this.currency();
    const count = nights.length === 1 ? '1 night' : `${nights.length} nights`;
    if (this.view() === 'savings') {
      const compared = nights.filter((n) => n.baselineEnergyCost !== null);
      // The nights as the table shows them (each rounded as on every page), totalled as shown.
      const plan = shownSum(compared.map((n) => n.planEnergyCost));
      const baseline = shownSum(compared.map((n) => n.baselineEnergyCost));
      return `${count} with a published plan. Their charging energy costs ${money(plan, c)} planned, against ${money(baseline, c)} under each night's baseline: ${money(baseline - plan, c)} saved on energy (demand is billed on the period's peak, see the savings card). Each night's figures are in the table under the chart.`;
    }
    const metered = nights.filter((n) => n.actualSiteEnergyCost !== null);
    if (!metered.length)
      return `${count} with a published plan; no meter data covers any of them yet, so only the projected site energy cost is shown.`;
    const full = metered.filter(fullyMetered);
    const partial = metered.length - full.length;
    const cover = `Meter data covers ${metered.length} of ${count}${partial ? ` (${partial} only in part: both bars of such a night cover its metered intervals only)` : ''}.`;
    const actual = metered.reduce((a, n) => a + (n.actualSiteEnergyCost ?? 0), 0);
    const projected = metered.reduce((a, n) => a + (projectedAgainstMeter(n) ?? 0), 0);
    return `${cover} Over the metered intervals, the site's energy cost ${money(actual, c)} metered against ${money(projected, c)} projected. Each night's figures are in the table under the chart.`;
  });

  protected readonly rows = computed(() => {
    const c = this.currency();
    return this.nights().map((n) => ({
      key: n.planId,
      day: shortDay(n.date),
      plan: money(n.planEnergyCost, c),
      baseline: n.baselineEnergyCost === null ? '—' : money(n.baselineEnergyCost, c),
      projected: money(n.projectedSiteEnergyCost, c),
      projectedMetered: n.actualSiteEnergyCost === null || fullyMetered(n) ? '—' : money(projectedAgainstMeter(n)!, c),
      metered:
        n.actualSiteEnergyCost === null
          ? '—'
          : `${money(n.actualSiteEnergyCost, c)}${fullyMetered(n) ? '' : ' (part of the night)'}`,
    }));
  });

  protected readonly fileName = computed(() => `costs-nights-chart-${monthKey(this.month().period.start)}.csv`);
  protected readonly csv = computed<CsvTable>(() => {
    const c = this.currency();
    return {
      header: [
        'Night',
        `Charging energy, planned (${c})`,
        `Charging energy, baseline (${c})`,
        `Site energy projected (${c})`,
        `Site energy metered (${c})`,
      ],
      rows: this.nights().map((n) => [
        n.date,
        cents(n.planEnergyCost),
        n.baselineEnergyCost === null ? null : cents(n.baselineEnergyCost),
        cents(n.projectedSiteEnergyCost),
        n.actualSiteEnergyCost === null ? null : cents(n.actualSiteEnergyCost),
      ]),
    };
  });

  protected choose(view: NightsView): void {
    this.view.set(view);
  }
}
