import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { BillView } from '@nightyard/contracts';
import { cents, instantAt, instantCsv, kw, kwh, money, num, unitPrice } from './costs-format';
import { CsvExportButton } from './csv-export-button';
import type { CsvTable } from './csv';

const UNIT_WORDS: Record<BillView['fixed'][number]['unit'], [string, string]> = {
  kWh: ['kWh', 'kWh'],
  kW: ['kW', 'kW'],
  day: ['day', 'days'],
  month: ['month', 'months'],
};

function quantityText(quantity: number, unit: BillView['fixed'][number]['unit']): string {
  if (unit === 'kW') return kw(quantity);
  const [one, many] = UNIT_WORDS[unit];
  return `${num(quantity, unit === 'kWh' ? 0 : 2)} ${quantity === 1 ? one : many}`;
}

/**
 * A bill as the utility would print it: energy by time-of-use period, demand charges with the
 * peak kW and when it was set, fixed charges, the total. With its CSV export.
 */
@Component({
  selector: 'ny-bill-table',
  imports: [CsvExportButton],
  changeDetection: ChangeDetectionStrategy.OnPush,
  templateUrl: './bill-table.html',
  styleUrl: './costs-table.scss',
})
export class BillTable {
  readonly bill = input.required<BillView>();
  readonly timezone = input.required<string>();
  /** What the bill is, for the caption ("Projected bill, December 2026"). */
  readonly caption = input.required<string>();
  readonly fileName = input.required<string>();

  protected readonly currency = computed(() => this.bill().currency);

  protected readonly sections = computed(() => {
    const b = this.bill();
    const c = b.currency;
    const tz = this.timezone();
    const line = (l: BillView['energy'][number], peakAt: number | null = null) => ({
      name: l.name,
      quantity: quantityText(l.quantity, l.unit),
      rate: `${unitPrice(l.rate, c)} per ${l.unit}`,
      amount: money(l.amount, c),
      peakAt: instantAt(peakAt, tz),
    });
    return [
      {
        key: 'energy',
        title: 'Energy',
        empty: 'No energy used',
        lines: b.energy.map((l) => line(l)),
        total: money(b.energyTotal, c),
        totalLabel: `Energy total, ${kwh(b.kwh)}`,
      },
      {
        key: 'demand',
        title: 'Demand',
        empty: 'No demand charge in this rate plan',
        lines: b.demand.map((l) => line(l, l.peakAt)),
        total: money(b.demandTotal, c),
        totalLabel: 'Demand total',
      },
      {
        key: 'fixed',
        title: 'Fixed charges',
        empty: 'No fixed charges in this rate plan',
        lines: b.fixed.map((l) => line(l)),
        total: money(b.fixedTotal, c),
        totalLabel: 'Fixed charges total',
      },
    ];
  });

  protected readonly total = computed(() => money(this.bill().total, this.currency()));

  protected readonly csv = computed<CsvTable>(() => {
    const b = this.bill();
    const c = b.currency;
    const tz = this.timezone();
    const row = (section: string, l: BillView['energy'][number], peakAt: number | null = null) => [
      section, l.name, Number(l.quantity.toFixed(3)), l.unit, l.rate, cents(l.amount), instantCsv(peakAt, tz),
    ];
    return {
      header: ['Section', 'Charge', 'Quantity', 'Unit', `Rate (${c})`, `Amount (${c})`, 'Peak set at (depot time)'],
      rows: [
        ...b.energy.map((l) => row('Energy', l)),
        ...b.demand.map((l) => row('Demand', l, l.peakAt)),
        ...b.fixed.map((l) => row('Fixed', l)),
        ['Total', 'Bill total', Number(b.kwh.toFixed(3)), 'kWh', null, cents(b.total), null],
      ],
    };
  });
}

