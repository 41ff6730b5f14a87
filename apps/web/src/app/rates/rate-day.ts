import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { RatePreview } from '@nightyard/contracts';
import { formatServiceDay } from '../depot-state/depot-format';
import { PriceChart } from './price-chart';
import { previewHours, type PreviewHour } from './preview-hours';
import { formatMoney, formatPrice } from './rate-format';

let nextId = 0;

interface Band {
  period: string;
  price: number;
  demandCharge: number;
  from: string;
  to: string;
}

/** Consecutive hours (or parts) at one period and price, for the text summary. */
function bandsOf(hours: readonly PreviewHour[]): Band[] {
  const out: Band[] = [];
  hours.forEach((h, i) => {
    h.parts.forEach((p, k) => {
      const to = h.parts[k + 1]?.from ?? hours[i + 1]?.short.slice(0, 5) ?? '24:00';
      const last = out.at(-1);
      if (last && last.period === p.period && last.price === p.price) last.to = to;
      else out.push({ period: p.period, price: p.price, demandCharge: p.demandCharge, from: p.from, to });
    });
  });
  return out;
}

/** One previewed day: what it is, its price bands in words, the chart and the hourly table. */
@Component({
  selector: 'ny-rate-day',
  imports: [PriceChart],
  changeDetection: ChangeDetectionStrategy.OnPush,
  templateUrl: './rate-day.html',
  styleUrls: ['./rate-table.scss', './rate-day.scss'],
})
export class RateDay {
  readonly preview = input.required<RatePreview>();
  readonly timezone = input.required<string>();

  protected readonly summaryId = `ny-rate-day-${nextId++}`;
  protected readonly hours = computed(() => previewHours(this.preview(), this.timezone()));
  protected readonly day = computed(() => {
    const p = this.preview();
    const type = p.dayType === 'weekday' ? 'a weekday' : p.dayType === 'weekend' ? 'a weekend day' : 'a holiday';
    return `${formatServiceDay(p.date)}: ${type} in the season "${p.season}", ${this.hours().length} hours`;
  });
  protected readonly bands = computed(() => {
    const c = this.preview().currency;
    return bandsOf(this.hours()).map((b) => ({
      ...b,
      priceText: formatPrice(b.price, c),
      demandText: b.demandCharge > 0 ? formatMoney(b.demandCharge, c) : null,
    }));
  });
  protected readonly facility = computed(() =>
    formatMoney(this.preview().facilityDemandCharge, this.preview().currency),
  );
  protected readonly demandBands = computed(() => this.bands().filter((b) => b.demandText));
  protected readonly rows = computed(() => {
    const c = this.preview().currency;
    const facility = this.preview().facilityDemandCharge;
    // The facility demand charge applies at every hour (the period's highest 15 minutes, whenever
    // they fall); a period's own demand charge is added on top inside its windows.
    const demandText = (period: string, charge: number) => {
      const parts = [
        ...(facility > 0 ? [`${formatMoney(facility, c)} facility`] : []),
        ...(charge > 0 ? [`${formatMoney(charge, c)} ${period}`] : []),
      ];
      return parts.length ? parts.join(' + ') : '—';
    };
    return this.hours().map((h) => ({
      label: h.label,
      parts: h.parts.map((p) => ({
        when: h.parts.length > 1 ? `from ${p.from}` : '',
        period: p.period,
        price: formatPrice(p.price, c),
        demand: demandText(p.period, p.demandCharge),
        hasDemand: p.demandCharge > 0 || facility > 0,
      })),
    }));
  });
  protected readonly chartLabel = computed(
    () =>
      `Bar chart: price per kWh for each hour of ${formatServiceDay(this.preview().date)}, coloured by time-of-use period`,
  );
}
