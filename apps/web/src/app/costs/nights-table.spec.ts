import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { monthCosts } from './costs-fixtures';
import { NightsTable } from './nights-table';

describe('NightsTable', () => {
  it('shows each night as every page does and totals what it shows, so rows and columns add up', async () => {
    TestBed.configureTestingModule({ providers: [provideRouter([])] });
    const base = monthCosts();
    // Unrounded figures as the API sends them (the demo's two December nights).
    const nights = [
      { ...base.nights[0]!, planEnergyCost: 95.468304, baselineEnergyCost: 95.468304 },
      { ...base.nights[1]!, planEnergyCost: 136.783392, baselineEnergyCost: 129.615392 },
    ];
    const fixture = TestBed.createComponent(NightsTable);
    fixture.componentRef.setInput('month', monthCosts({ nights }));
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    const text = (e: Element | null) => e?.textContent?.replace(/\s+/g, ' ').trim() ?? '';
    const rows = [...el.querySelectorAll('tbody tr')].map((r) => text(r));
    // $129.615392 shows as $129.62, as on the night's own page, Tonight and Plans.
    expect(rows[1]).toContain('$136.78');
    expect(rows[1]).toContain('$129.62');
    expect(rows[1]).toContain('-$7.16');
    const foot = text(el.querySelector('tfoot'));
    expect(foot).toContain('$232.25');
    expect(foot).toContain('$225.09');
    expect(foot).toContain('-$7.16');
    // A loss is coloured as one in the total as in its row (the total was always coloured a saving).
    const savingCell = (row: Element | null) => row!.querySelectorAll('td')[2]!;
    expect(text(savingCell(el.querySelectorAll('tbody tr')[1]!))).toBe('-$7.16');
    expect(savingCell(el.querySelectorAll('tbody tr')[1]!).className).toContain('over');
    expect(text(savingCell(el.querySelector('tfoot tr')))).toBe('-$7.16');
    expect(savingCell(el.querySelector('tfoot tr')).className).toContain('over');
    expect(savingCell(el.querySelector('tfoot tr')).className).not.toContain('saving');
  });

  it("marks a night across the billing period's edge as this period's part of it, on screen and in the CSV", async () => {
    TestBed.configureTestingModule({ providers: [provideRouter([])] });
    const base = monthCosts();
    const nights = [base.nights[0]!, { ...base.nights[1]!, periodPart: 'end' as const }];
    const fixture = TestBed.createComponent(NightsTable);
    fixture.componentRef.setInput('month', monthCosts({ nights }));
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    const rows = [...el.querySelectorAll('tbody tr th')].map((r) => r.textContent?.replace(/\s+/g, ' ') ?? '');
    expect(rows[0]).not.toContain('billing period');
    expect(rows[1]).toContain('to the end of this billing period; the rest of the night is in the next');
    const csv = (fixture.componentInstance as unknown as { csv: () => { header: string[]; rows: unknown[][] } }).csv();
    expect(csv.header.at(-1)).toBe('Part of the night in this period');
    expect(csv.rows.map((r) => r.at(-1))).toEqual(['whole night', "to the period's end"]);
  });
});
