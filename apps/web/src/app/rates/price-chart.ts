import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  afterNextRender,
  computed,
  effect,
  inject,
  input,
  signal,
} from '@angular/core';
import {
  BarController,
  BarElement,
  CategoryScale,
  LineController,
  LineElement,
  LinearScale,
  PointElement,
  Tooltip,
  type ChartData,
  type ChartDataset,
  type ChartOptions,
} from 'chart.js';
import { BaseChartDirective, provideCharts } from 'ng2-charts';
import { ThemeStore } from '../core/theme-store';
import type { PreviewHour } from './preview-hours';
import { formatMoney, formatPrice } from './rate-format';

/** Theme colours resolved for the canvas (it cannot read CSS variables). */
interface ChartColours {
  bands: string[];
  line: string;
  text: string;
  grid: string;
}

const FALLBACK: ChartColours = {
  bands: ['#0d6b5e', '#c78a12', '#ba1a1a', '#4a635e'],
  line: '#1b1c1c',
  text: '#3f4946',
  grid: '#bfc9c5',
};
/** Probe classes, cheapest band first: off-peak in the primary colour, the dearest in the error colour. */
const BAND_PROBES = ['primary', 'tertiary', 'error', 'secondary'];

/** A period's colour: by its rank in price among the day's periods, cheapest first. */
export function bandColours(hours: readonly PreviewHour[], palette: readonly string[]): Map<string, string> {
  const byPrice = new Map<string, number>();
  for (const h of hours) for (const p of h.parts) byPrice.set(p.period, Math.max(byPrice.get(p.period) ?? 0, p.price));
  const ranked = [...byPrice.entries()].sort((a, b) => a[1] - b[1]).map(([name]) => name);
  const out = new Map<string, string>();
  ranked.forEach((name, i) => {
    // Two periods: cheap and dear. Three: cheap, middle, dear. More: the extra colours in between.
    const last = ranked.length - 1;
    const index = i === 0 ? 0 : i === last ? 2 : i === 1 ? 1 : 3;
    out.set(name, palette[index % palette.length]!);
  });
  return out;
}

/**
 * The day's price of each hour as bars coloured by time-of-use period, with the demand charge per
 * kW as a stepped line where one applies. Decorative for screen readers: the summary and the
 * hourly table say the same.
 */
@Component({
  selector: 'ny-price-chart',
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
        Tooltip,
      ],
    }),
  ],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <span class="probes" aria-hidden="true">
      @for (p of probes; track p) {
        <span [class]="'probe ' + p"></span>
      }
    </span>
    <ul class="legend" aria-label="Chart key">
      @for (b of legend(); track b.period) {
        <li><span class="swatch" [style.background]="b.colour"></span>{{ b.period }}: {{ b.price }} per kWh</li>
      }
      @if (hasDemand()) {
        <li>
          <span class="swatch line" [style.border-color]="colours().line"></span>Demand charge per kW (right scale)
        </li>
      }
    </ul>
    <div class="box">
      <canvas
        baseChart
        type="bar"
        [data]="data()"
        [options]="options()"
        role="img"
        [attr.aria-label]="label()"
        [attr.aria-describedby]="describedBy()"
      ></canvas>
    </div>
  `,
  styles: `
    :host {
      display: block;
    }
    .probes {
      position: absolute;
      width: 0;
      height: 0;
      overflow: hidden;
    }
    .probe.primary {
      color: var(--mat-sys-primary);
    }
    .probe.tertiary {
      color: var(--mat-sys-tertiary);
    }
    .probe.error {
      color: var(--mat-sys-error);
    }
    .probe.secondary {
      color: var(--mat-sys-secondary);
    }
    .probe.text {
      color: var(--mat-sys-on-surface-variant);
    }
    .probe.grid {
      color: var(--mat-sys-outline-variant);
    }
    .probe.line {
      color: var(--mat-sys-on-surface);
    }
    .box {
      position: relative;
      height: 260px;
    }
    .legend {
      display: flex;
      flex-wrap: wrap;
      gap: 4px 16px;
      margin: 0 0 8px;
      padding: 0;
      list-style: none;
      font: var(--mat-sys-body-medium);
    }
    .legend li {
      display: inline-flex;
      align-items: center;
      gap: 6px;
    }
    .swatch {
      display: inline-block;
      width: 14px;
      height: 14px;
      border-radius: 3px;
    }
    .swatch.line {
      height: 0;
      width: 18px;
      border-top: 3px dashed;
      border-radius: 0;
    }
    @media (max-width: 600px) {
      .box {
        height: 220px;
      }
    }
  `,
})
export class PriceChart {
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly theme = inject(ThemeStore);

  readonly hours = input.required<readonly PreviewHour[]>();
  readonly currency = input('USD');
  /** What the chart shows, in words (the canvas's accessible name). */
  readonly label = input('Price of each hour');
  /** The id of the text that describes the chart. */
  readonly describedBy = input<string | null>(null);

  protected readonly probes = [...BAND_PROBES, 'text', 'grid', 'line'];
  protected readonly colours = signal<ChartColours>(FALLBACK);
  private readonly schemeTick = signal(0);

  private readonly bands = computed(() => bandColours(this.hours(), this.colours().bands));
  protected readonly hasDemand = computed(() => this.hours().some((h) => h.parts.some((p) => p.demandCharge > 0)));
  protected readonly legend = computed(() => {
    const c = this.currency();
    const prices = new Map<string, number>();
    for (const h of this.hours()) for (const p of h.parts) prices.set(p.period, p.price);
    return [...this.bands().entries()].map(([period, colour]) => ({
      period,
      colour,
      price: formatPrice(prices.get(period) ?? 0, c),
    }));
  });

  protected readonly data = computed<ChartData<'bar'>>(() => {
    const hours = this.hours();
    const bands = this.bands();
    const datasets: ChartDataset<'bar'>[] = [
      {
        label: 'Price per kWh',
        data: hours.map((h) => h.main.price),
        backgroundColor: hours.map((h) => bands.get(h.main.period) ?? FALLBACK.bands[0]!),
        borderWidth: 0,
        barPercentage: 1,
        categoryPercentage: 0.92,
        yAxisID: 'y',
        order: 2,
      },
    ];
    if (this.hasDemand()) {
      const line = {
        type: 'line',
        label: 'Demand charge per kW',
        data: hours.map((h) => Math.max(...h.parts.map((p) => p.demandCharge))),
        borderColor: this.colours().line,
        backgroundColor: this.colours().line,
        borderDash: [6, 4],
        borderWidth: 2,
        pointRadius: 0,
        stepped: 'middle',
        yAxisID: 'y1',
        order: 1,
      };
      datasets.push(line as unknown as ChartDataset<'bar'>);
    }
    return { labels: hours.map((h) => h.short), datasets };
  });

  protected readonly options = computed<ChartOptions<'bar'>>(() => {
    const { text, grid } = this.colours();
    const currency = this.currency();
    const hours = this.hours();
    return {
      responsive: true,
      maintainAspectRatio: false,
      animation: false,
      interaction: { mode: 'index', intersect: false },
      plugins: {
        legend: { display: false },
        tooltip: {
          callbacks: {
            title: (items) => hours[items[0]?.dataIndex ?? 0]?.label ?? '',
            label: (item) =>
              item.datasetIndex === 0
                ? `${hours[item.dataIndex]?.main.period}: ${formatPrice(Number(item.raw), currency)} per kWh`
                : `Demand charge: ${formatMoney(Number(item.raw), currency)} per kW`,
          },
        },
      },
      scales: {
        x: { ticks: { color: text, maxRotation: 0, autoSkip: true, autoSkipPadding: 8 }, grid: { display: false } },
        y: {
          beginAtZero: true,
          title: { display: true, text: `${currency} per kWh`, color: text },
          ticks: { color: text },
          grid: { color: grid },
        },
        ...(this.hasDemand()
          ? {
              y1: {
                position: 'right' as const,
                beginAtZero: true,
                title: { display: true, text: `${currency} per kW`, color: text },
                ticks: { color: text },
                grid: { display: false },
              },
            }
          : {}),
      },
    };
  });

  constructor() {
    afterNextRender(() => this.readColours());
    // Light, dark or the device's choice: read the colours again when any of them changes.
    effect(() => {
      this.theme.choice();
      this.schemeTick();
      requestAnimationFrame(() => this.readColours());
    });
    const media = typeof matchMedia === 'function' ? matchMedia('(prefers-color-scheme: dark)') : null;
    const onChange = () => this.schemeTick.update((n) => n + 1);
    media?.addEventListener?.('change', onChange);
    inject(DestroyRef).onDestroy(() => media?.removeEventListener?.('change', onChange));
  }

  private readColours(): void {
    const root = this.host.nativeElement;
    const read = (name: string, fallback: string) => {
      const el = root.querySelector(`.probe.${name}`);
      const value = el ? getComputedStyle(el).color : '';
      return value && value !== 'rgba(0, 0, 0, 0)' && value !== 'canvastext' ? value : fallback;
    };
    this.colours.set({
      bands: BAND_PROBES.map((p, i) => read(p, FALLBACK.bands[i]!)),
      line: read('line', FALLBACK.line),
      text: read('text', FALLBACK.text),
      grid: read('grid', FALLBACK.grid),
    });
  }
}
