import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { footedCents, toCents, type BillView } from '@nightyard/contracts';
import { instantAt, instantCsv, kwh, money, num, unitPrice } from './costs-format';
import { CsvExportButton } from './csv-export-button';
import type { CsvTable } from './csv';

const UNIT_WORDS: Record<BillView['fixed'][number]['unit'], [string, string]> = {
  kWh: ['kWh', 'kWh'],
  kW: ['kW', 'kW'],
  day: ['day', 'days'],
  month: ['month', 'months'],
};

/**
 * A line's quantity, a kW figure to the tenth or as many more places (up to three) as it takes for
 * it times the rate to make the amount shown: "185 kW at $7.50" beside $1,387.51 did not multiply.
 */
function quantityText(quantity: number, unit: BillView['fixed'][number]['unit'], rate: number, cents: number): string {
  if (unit === 'kW') {
    const digits = [1, 2, 3].find((d) => toCents(Number(quantity.toFixed(d)) * rate) === cents) ?? 3;
    return `${num(quantity, digits)} kW`;
  }
  const [one, many] = UNIT_WORDS[unit];
  return `${num(quantity, unit === 'kWh' ? 0 : 2)} ${quantity === 1 ? one : many}`;
}

/**
 * The cents shown for a bill, one rounding rule: the total is the bill's rounded once; each
 * demand and fixed line is its own amount rounded (quantity x rate, which an analyst checks), and
 * the energy lines, whose kWh are shown whole and never multiply out to the cent, foot to what is
 * left (footedCents). Without energy lines every section foots to the total.
 */
export function billCents(b: BillView) {
  const total = toCents(b.total);
  const sum = (xs: number[]) => xs.reduce((a, x) => a + Math.round(x * 100), 0) / 100;
  if (b.energy.length) {
    const demand = b.demand.map((l) => toCents(l.amount));
    const fixed = b.fixed.map((l) => toCents(l.amount));
    const demandShown = sum(demand);
    const fixedShown = sum(fixed);
    const energyShown = toCents(total - demandShown - fixedShown);
    const energy = footedCents(
      b.energy.map((l) => l.amount),
      energyShown,
    );
    return { total, energy, demand, fixed, energyShown, demandShown, fixedShown };
  }
  const [energyShown, demandShown, fixedShown] = footedCents([b.energyTotal, b.demandTotal, b.fixedTotal], total) as [
    number,
    number,
    number,
  ];
  return {
    total,
    energy: footedCents(
      b.energy.map((l) => l.amount),
      energyShown,
    ),
    demand: footedCents(
      b.demand.map((l) => l.amount),
      demandShown,
    ),
    fixed: footedCents(
      b.fixed.map((l) => l.amount),
      fixedShown,
    ),
    energyShown,
    demandShown,
    fixedShown,
  };
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
  /**
   * Now, for a bill that runs on past it (the projected bill): a peak after it has not been set,
   * it is projected, and says so. Null: every peak shown is one already set.
   */
  readonly nowMs = input<number | null>(null);

  protected readonly currency = computed(() => this.bill().currency);

  protected readonly sections = computed(() => {
    const b = this.bill();
    const c = b.currency;
    const tz = this.timezone();
    const now = this.nowMs();
    const cents = billCents(b);
    const { energyShown, demandShown, fixedShown } = cents;
    const shown = { energy: cents.energy, demand: cents.demand, fixed: cents.fixed };
    const line = (l: BillView['energy'][number], amount: number, peakAt: number | null = null) => ({
      name: l.name,
      quantity: quantityText(l.quantity, l.unit, l.rate, amount),
      rate: `${unitPrice(l.rate, c)} per ${l.unit}`,
      amount: money(amount, c),
      peakAt: instantAt(peakAt, tz),
      peakWord: now !== null && peakAt !== null && peakAt >= now ? 'projected peak' : 'peak set',
      note: l.note ?? null,
    });
    return [
      {
        key: 'energy',
        title: 'Energy',
        empty: 'No energy used',
        lines: b.energy.map((l, i) => line(l, shown.energy[i]!)),
        total: money(energyShown, c),
        totalLabel: `Energy total, ${kwh(b.kwh)}`,
      },
      {
        key: 'demand',
        title: 'Demand',
        empty: 'No demand charge in this rate plan',
        lines: b.demand.map((l, i) => line(l, shown.demand[i]!, l.peakAt)),
        total: money(demandShown, c),
        totalLabel: 'Demand total',
      },
      {
        key: 'fixed',
        title: 'Fixed charges',
        empty: 'No fixed charges in this rate plan',
        lines: b.fixed.map((l, i) => line(l, shown.fixed[i]!)),
        total: money(fixedShown, c),
        totalLabel: 'Fixed charges total',
      },
    ];
  });

  protected readonly total = computed(() => money(toCents(this.bill().total), this.currency()));

  protected readonly csv = computed<CsvTable>(() => {
    const b = this.bill();
    const c = b.currency;
    const tz = this.timezone();
    // The same cents as the table, so the export adds up as the page does.
    const { energy, demand, fixed, energyShown, demandShown, fixedShown } = billCents(b);
    const row = (section: string, l: BillView['energy'][number], amount: number, peakAt: number | null = null) => [
      section,
      l.name,
      Number(l.quantity.toFixed(3)),
      l.unit,
      l.rate,
      amount,
      instantCsv(peakAt, tz),
      l.note ?? null,
    ];
    return {
      header: ['Section', 'Charge', 'Quantity', 'Unit', `Rate (${c})`, `Amount (${c})`, 'Peak at (depot time)', 'Note'],
      // Each section's total as the page words it (the kWh on the energy total), then the bill's.
      rows: [
        ...b.energy.map((l, i) => row('Energy', l, energy[i]!)),
        ['Energy', 'Energy total', Number(b.kwh.toFixed(3)), 'kWh', null, energyShown, null, null],
        ...b.demand.map((l, i) => row('Demand', l, demand[i]!, l.peakAt)),
        ['Demand', 'Demand total', null, null, null, demandShown, null, null],
        ...b.fixed.map((l, i) => row('Fixed', l, fixed[i]!)),
        ['Fixed', 'Fixed charges total', null, null, null, fixedShown, null, null],
        ['Total', 'Bill total', null, null, null, toCents(b.total), null, null],
      ],
    };
  });
}
