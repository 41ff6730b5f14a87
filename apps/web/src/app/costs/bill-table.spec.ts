import { TestBed } from '@angular/core/testing';
import { bill } from './costs-fixtures';
import { BillTable } from './bill-table';

describe('BillTable', () => {
  async function render(b = bill(), nowMs: number | null = null) {
    const fixture = TestBed.createComponent(BillTable);
    fixture.componentRef.setInput('bill', b);
    fixture.componentRef.setInput('nowMs', nowMs);
    fixture.componentRef.setInput('timezone', 'America/Chicago');
    fixture.componentRef.setInput('caption', 'Projected bill, December 2026');
    fixture.componentRef.setInput('fileName', 'costs-bill-projected-2026-12.csv');
    await fixture.whenStable();
    fixture.detectChanges();
    return fixture.nativeElement as HTMLElement;
  }

  const text = (el: Element | null | undefined) => el?.textContent?.replace(/\s+/g, ' ').trim() ?? '';
  const cells = (tr: Element | null) =>
    [...(tr?.children ?? [])]
      .map((c) => text(c))
      .filter(Boolean)
      .join(' ');
  const rowOf = (el: HTMLElement, label: string) =>
    [...el.querySelectorAll('tr')].find((tr) => text(tr.querySelector('th')).startsWith(label));

  it('lists energy by period, demand with its peak and when, fixed charges, and each total', async () => {
    const el = await render();
    const heads = [...el.querySelectorAll('tr.section-head th')].map(text);
    expect(heads).toEqual(['Energy', 'Demand', 'Fixed charges']);

    const onPeak = rowOf(el, 'Energy, on-peak')!;
    expect([...onPeak.querySelectorAll('td')].map(text)).toEqual([
      '1,501 kWh at $0.18 per kWh',
      '$0.18 per kWh',
      '$270.09',
    ]);

    const facility = rowOf(el, 'Facility demand')!;
    expect(text(facility.querySelector('th'))).toMatch(/^Facility demand peak set /);
    expect(text(facility.querySelector('.peak-at'))).toMatch(/^peak set .*2.*17:15$/);
    expect([...facility.querySelectorAll('td')].map(text)).toEqual([
      '185 kW at $7.50 per kW',
      '$7.50 per kW',
      '$1,387.50',
    ]);

    expect(text(rowOf(el, 'Customer charge'))).toContain('31 days');
    expect([...el.querySelectorAll('tr.subtotal')].map(cells)).toEqual([
      'Energy total, 13,501 kWh $1,086.09',
      'Demand total $1,819.50',
      'Fixed charges total $46.50',
    ]);
    expect(cells(el.querySelector('tfoot tr.grand-total'))).toBe('Total $2,952.09');
  });

  it('calls a peak of the projected bill after now projected, not set (a peak "set" on Thu Dec 10 read on Fri Dec 4)', async () => {
    const peakAt = bill().demand[0]!.peakAt!;
    const before = await render(bill(), peakAt - 86_400_000);
    expect(text(rowOf(before, 'Facility demand')?.querySelector('.peak-at'))).toMatch(/^projected peak .*17:15$/);
    const after = await render(bill(), peakAt + 86_400_000);
    expect(text(rowOf(after, 'Facility demand')?.querySelector('.peak-at'))).toMatch(/^peak set .*17:15$/);
  });

  it('says so when the rate plan has no demand or fixed charge', async () => {
    const el = await render(bill({ demand: [], fixed: [], demandTotal: 0, fixedTotal: 0, total: 1086.09 }));
    expect(el.textContent).toContain('No demand charge in this rate plan');
    expect(el.textContent).toContain('No fixed charges in this rate plan');
    expect(cells(el.querySelector('tr.grand-total'))).toBe('Total $1,086.09');
  });

  it("exports the lines, each section's total and the bill total, amounts as plain numbers", async () => {
    const el = await render();
    const blobs: Blob[] = [];
    const create = vi.spyOn(URL, 'createObjectURL').mockImplementation((b) => (blobs.push(b as Blob), 'blob:x'));
    const click = vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(() => undefined);
    el.querySelector<HTMLButtonElement>('ny-csv-export-button button')!.click();
    const lines = (await blobs[0]!.text()).split('\r\n');
    expect(lines[0]).toBe('Section,Charge,Quantity,Unit,Rate (USD),Amount (USD),Peak at (depot time),Note');
    expect(lines[1]).toBe('Energy,"Energy, off-peak",12000,kWh,0.068,816,,');
    expect(lines[3]).toBe('Energy,Energy total,13500.5,kWh,,1086.09,,');
    expect(lines[4]).toBe('Demand,Facility demand,185,kW,7.5,1387.5,2026-12-02 17:15,');
    // Each section's total as the page shows it, then the bill's: an amount, no quantity.
    expect(lines[6]).toBe('Demand,Demand total,,,,1819.5,,');
    expect(lines.slice(8, 10)).toEqual(['Fixed,Fixed charges total,,,,46.5,,', 'Total,Bill total,,,,2952.09,,']);
    create.mockRestore();
    click.mockRestore();
  });

  it('shows full-precision amounts so the lines add up to the shown total to the cent (one rounding rule)', async () => {
    // Three thirds of a dollar each rounded alone would show $0.33 three times beside a $1.00 total.
    const third = 1 / 3;
    const line = (name: string) => ({ name, quantity: 1, unit: 'kWh' as const, rate: third, amount: third });
    const el = await render(
      bill({
        energy: [line('Energy, a'), line('Energy, b'), line('Energy, c')],
        demand: [],
        fixed: [],
        energyTotal: 1,
        demandTotal: 0,
        fixedTotal: 0,
        total: 1,
        kwh: 3,
      }),
    );
    const amounts = ['Energy, a', 'Energy, b', 'Energy, c'].map((n) =>
      text([...rowOf(el, n)!.querySelectorAll('td')].at(-1)),
    );
    expect(amounts).toEqual(['$0.34', '$0.33', '$0.33']);
    expect(cells(el.querySelector('tfoot tr.grand-total'))).toBe('Total $1.00');
  });

  it('a demand line multiplies out to its amount as shown: a cent of rounding goes to the energy lines', async () => {
    // 185.000001 kW x $7.50 is $1,387.50; 261.1733 kW x $7.50 is $1,958.80 (shown as 261.2 kW it read $1,959.00).
    const kwLine = (name: string, quantity: number) => ({
      name,
      quantity,
      unit: 'kW' as const,
      rate: 7.5,
      amount: quantity * 7.5,
      peakAt: null,
    });
    const third = 1 / 3;
    const e = (name: string) => ({ name, quantity: 1, unit: 'kWh' as const, rate: third, amount: third });
    const demand = [kwLine('Facility demand', 185.000001), kwLine('On-peak demand', 261.1733)];
    const total = 1 + 185.000001 * 7.5 + 261.1733 * 7.5;
    const el = await render(
      bill({
        energy: [e('Energy, a'), e('Energy, b'), e('Energy, c')],
        demand,
        fixed: [],
        energyTotal: 1,
        demandTotal: total - 1,
        fixedTotal: 0,
        total,
        kwh: 3,
      }),
    );
    const row = (n: string) => [...rowOf(el, n)!.querySelectorAll('td')].map((td) => text(td));
    expect(row('Facility demand').join(' | ')).toMatch(/185 kW at \$7\.50 per kW \| .*\$1,387\.50$/);
    expect(row('On-peak demand').join(' | ')).toMatch(/261\.173 kW at \$7\.50 per kW \| .*\$1,958\.80$/);
    const shown = ['Energy, a', 'Energy, b', 'Energy, c', 'Facility demand', 'On-peak demand'].map((n) =>
      Math.round(Number(/\$([\d,]+\.\d\d)$/.exec(row(n).join(' '))![1]!.replace(/,/g, '')) * 100),
    );
    expect(shown.reduce((a, x) => a + x, 0)).toBe(Math.round(total * 100));
  });

  it("shows where a billed demand comes from when it is not the intervals' own peak", async () => {
    const b = bill();
    b.demand[0] = {
      ...b.demand[0]!,
      peakAt: null,
      note: 'Demand ratchet: 80 % of 400 kW, the highest demand of the previous 11 months (from meter readings)',
    };
    const el = await render(b);
    expect(text(rowOf(el, 'Facility demand'))).toContain('Demand ratchet: 80 % of 400 kW');
  });
});
