import { ChangeDetectionStrategy, Component, ElementRef, computed, input, viewChild } from '@angular/core';
import type { PlanResult } from '@nightyard/contracts';
import {
  BarController,
  BarElement,
  CategoryScale,
  Legend,
  LineController,
  LineElement,
  LinearScale,
  PointElement,
  Tooltip,
  type ChartConfiguration,
  type ChartData,
} from 'chart.js';
import { BaseChartDirective, provideCharts } from 'ng2-charts';
import { injectThemeColours } from '../shared/theme-colours';
import { horizonOf } from '@nightyard/contracts/plan-horizon';
import { spansDays } from '../yard/yard-format';
import { clock, dayClock, money, num } from './plan-format';

type Colors = Record<'load' | 'limit' | 'price' | 'text' | 'grid', string>;
/** The kW axis reaches a quarter above the highest load or limit (see `options`). */
const KW_HEADROOM = 1.25;
const FALLBACK: Colors = { load: '#0d6b5e', limit: '#ba1a1a', price: '#c78a12', text: '#444', grid: '#ccc' };

/**
 * The hours of the night: average and highest load, the limit and the price, for the table. A
 * night longer than a day (Friday's runs to Monday) names each hour's weekday ("Sat 15:00"): its
 * clock hours come round more than once.
 */
export function hourlyLoad(result: Pick<PlanResult, 'slots'>, timeZone: string) {
  const hours: { hour: string; loads: number[]; limit: number; prices: Set<number> }[] = [];
  const longerThanADay = spansDays(horizonOf(result));
  for (const s of result.slots) {
    const time = longerThanADay ? dayClock(s.start, timeZone) : clock(s.start, timeZone);
    const hour = `${time.slice(0, -2)}00`;
    let h = hours.at(-1);
    if (!h || h.hour !== hour) {
      h = { hour, loads: [], limit: s.limitKw, prices: new Set() };
      hours.push(h);
    }
    h.loads.push(s.loadKw);
    h.limit = Math.min(h.limit, s.limitKw);
    h.prices.add(s.price);
  }
  return hours.map((h) => ({
    hour: h.hour,
    averageKw: h.loads.reduce((a, b) => a + b, 0) / h.loads.length,
    highestKw: Math.max(...h.loads),
    limitKw: h.limit,
    prices: [...h.prices],
  }));
}

/**
 * The axis label of slot `index`: its time when it starts a whole hour that falls on the step
 * (1, 2, 3, 4, 6, 12 or 24 hours, the smallest that leaves 48 px between labels), else none. A
 * weekend's night on a phone needs the 12 and 24: every 6 hours its labels ran into each other.
 */
export function hourLabel(labels: readonly string[], index: number, widthPx: number): string | null {
  const label = labels[index];
  if (!label || !label.endsWith(':00')) return null;
  const pxPerHour = (widthPx / Math.max(labels.length, 1)) * 4;
  const step = [1, 2, 3, 4, 6, 12, 24].find((n) => n * pxPerHour >= 48) ?? 24;
  return Number(label.slice(-5, -3)) % step === 0 ? label : null;
}

/**
 * Each slot's time on the axis and in the tooltip. A night longer than a day names the weekday at
 * each midnight ("Sat 00:00"): a weekend's labels read "00:00" three times over.
 */
export function slotLabels(result: Pick<PlanResult, 'slots'>, timeZone: string): string[] {
  const longerThanADay = spansDays(horizonOf(result));
  return result.slots.map((s) => {
    const time = clock(s.start, timeZone);
    return longerThanADay && time === '00:00' ? dayClock(s.start, timeZone) : time;
  });
}

/** The site's load through the night against its service limit, with the price as a second axis. */
@Component({
  selector: 'ny-site-load-chart',
  imports: [BaseChartDirective],
  providers: [
    provideCharts({
      registerables: [
        BarController,
        BarElement,
        LineController,
        LineElement,
        PointElement,
        CategoryScale,
        LinearScale,
        Legend,
        Tooltip,
      ],
    }),
  ],
  changeDetection: ChangeDetectionStrategy.OnPush,
  templateUrl: './site-load-chart.html',
  styleUrls: ['./table-alternative.scss', './site-load-chart.scss'],
})
export class SiteLoadChart {
  readonly result = input.required<PlanResult>();
  readonly timezone = input.required<string>();
  readonly currency = input('USD');

  private readonly probes = viewChild<ElementRef<HTMLElement>>('probes');
  /** Canvas cannot use CSS variables: read the theme's colours from styled probes. */
  private readonly colors = injectThemeColours<keyof Colors>(this.probes, FALLBACK, 'data-color');

  protected readonly data = computed<ChartData<'bar' | 'line', number[], string>>(() => {
    const r = this.result();
    const c = this.colors();
    return {
      labels: slotLabels(r, this.timezone()),
      datasets: [
        {
          type: 'line',
          label: `Price (${this.currency()} per kWh)`,
          data: r.slots.map((s) => s.price),
          yAxisID: 'price',
          borderColor: c.price,
          backgroundColor: c.price,
          borderWidth: 2,
          stepped: true,
          pointRadius: 0,
          order: 0,
        },
        {
          type: 'line',
          label: 'Service limit (kW)',
          data: r.slots.map((s) => s.limitKw),
          yAxisID: 'kw',
          borderColor: c.limit,
          backgroundColor: c.limit,
          borderWidth: 2,
          borderDash: [6, 4],
          stepped: true,
          pointRadius: 0,
          order: 1,
        },
        {
          type: 'bar',
          label: 'Site load (kW)',
          data: r.slots.map((s) => s.loadKw),
          yAxisID: 'kw',
          backgroundColor: c.load,
          barPercentage: 1,
          categoryPercentage: 0.9,
          order: 2,
        },
      ],
    };
  });

  protected readonly options = computed<ChartConfiguration<'bar' | 'line'>['options']>(() => {
    const c = this.colors();
    const currency = this.currency();
    const slots = this.result().slots;
    const labels = slotLabels(this.result(), this.timezone());
    // Each axis scales to its own data, so the highest price and the service limit both came out
    // at the top and the price line drew over the limit. The kW axis now leaves a quarter above
    // its highest value: the limit sits at four fifths of the height at most, the top price above it.
    const kwMax = Math.max(0, ...slots.map((s) => Math.max(s.limitKw, s.loadKw))) * KW_HEADROOM;
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
              ctx.dataset.yAxisID === 'price'
                ? `Price: ${money(Number(ctx.parsed.y), currency, 3)}/kWh`
                : `${ctx.dataset.label}: ${num(Number(ctx.parsed.y))}`,
          },
        },
      },
      scales: {
        // Labels on whole hours only, every 1 to 24 hours as the chart's width allows.
        x: {
          ticks: {
            color: c.text,
            autoSkip: false,
            maxRotation: 0,
            callback(this: { width: number }, _value: unknown, index: number): string | null {
              return hourLabel(labels, index, this.width);
            },
          },
          grid: { display: false },
        },
        kw: {
          type: 'linear',
          position: 'left',
          beginAtZero: true,
          suggestedMax: kwMax,
          title: { display: true, text: 'kW', color: c.text },
          ticks: { color: c.text },
          grid: { color: c.grid },
        },
        price: {
          type: 'linear',
          position: 'right',
          beginAtZero: true,
          title: { display: true, text: `${currency}/kWh`, color: c.text },
          ticks: { color: c.text },
          grid: { drawOnChartArea: false },
        },
      },
    };
  });

  protected readonly summary = computed(() => {
    const slots = this.result().slots;
    const peak = Math.max(0, ...slots.map((s) => s.loadKw));
    const limit = Math.min(...slots.map((s) => s.limitKw));
    return `Site load through the night: highest ${num(peak)} kW against a service limit of ${num(limit)} kW. The same figures are in the table below, hour by hour.`;
  });

  protected readonly hours = computed(() =>
    hourlyLoad(this.result(), this.timezone()).map((h) => ({
      ...h,
      average: num(h.averageKw),
      highest: num(h.highestKw),
      limit: num(h.limitKw),
      price: h.prices.map((p) => money(p, this.currency(), 3)).join(' / '),
    })),
  );
}
