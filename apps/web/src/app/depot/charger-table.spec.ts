import { ComponentFixture, TestBed } from '@angular/core/testing';
import { ChargerTable, viewChargers } from './charger-table';
import { depotDetail } from '../shared/setup-fixtures';

describe('ChargerTable', () => {
  let fixture: ComponentFixture<ChargerTable>;
  let el: HTMLElement;
  const chargers = depotDetail().chargers;

  async function render(canEdit = true) {
    fixture = TestBed.createComponent(ChargerTable);
    fixture.componentRef.setInput('chargers', chargers);
    fixture.componentRef.setInput('timezone', 'America/Chicago');
    fixture.componentRef.setInput('canEdit', canEdit);
    el = fixture.nativeElement;
    await fixture.whenStable();
    fixture.detectChanges();
  }

  const labels = () => [...el.querySelectorAll('tr[mat-row] td.label')].map((td) => td.textContent?.trim());
  const header = (name: string) =>
    [...el.querySelectorAll<HTMLElement>('th[mat-sort-header]')].find((th) => th.textContent?.trim() === name)!;

  async function settle() {
    await fixture.whenStable();
    fixture.detectChanges();
  }

  it('lists chargers by label in natural order (C2 before C10)', async () => {
    await render();
    expect(labels()).toEqual(['C2', 'C10', 'D1', 'D2']);
    expect(el.textContent).toContain('4 chargers');
    expect(header('Label').getAttribute('aria-sort')).toBe('ascending');
  });

  it('sorts by a column when its header is clicked, then the other way', async () => {
    await render();
    header('Maximum').querySelector<HTMLElement>('.mat-sort-header-container')!.click();
    await settle();
    expect(labels()).toEqual(['C10', 'C2', 'D1', 'D2']);
    header('Maximum').querySelector<HTMLElement>('.mat-sort-header-container')!.click();
    await settle();
    expect(labels()).toEqual(['D1', 'D2', 'C2', 'C10']);
    expect(header('Maximum').getAttribute('aria-sort')).toBe('descending');
  });

  it('filters by text across label, connector, cabinet and reason', async () => {
    await render();
    const search = el.querySelector<HTMLInputElement>('input[type="search"]')!;
    search.value = 'cabinet a';
    search.dispatchEvent(new Event('input'));
    await settle();
    expect(labels()).toEqual(['D1', 'D2']);
    expect(el.textContent).toContain('Showing 2 of 4 chargers');

    search.value = 'tagged';
    search.dispatchEvent(new Event('input'));
    await settle();
    expect(labels()).toEqual(['D2']);
    expect(el.textContent).toContain('Cable damaged, tagged out');

    search.value = 'nothing like this';
    search.dispatchEvent(new Event('input'));
    await settle();
    expect(labels()).toEqual([]);
    expect(el.textContent).toContain('No charger matches the filter.');
  });

  it('filters by status and keeps the chosen order', () => {
    const out = viewChargers(chargers, { query: '', status: 'out_of_service', sort: 'label', direction: 'asc' });
    expect(out.map((c) => c.label)).toEqual(['D2']);
    const inService = viewChargers(chargers, { query: '', status: 'in_service', sort: 'maxKw', direction: 'desc' });
    expect(inService.map((c) => c.label)).toEqual(['D1', 'C2', 'C10']);
    const byCabinet = viewChargers(chargers, { query: '', status: 'all', sort: 'cabinet', direction: 'asc' });
    expect(byCabinet.map((c) => c.label)).toEqual(['D1', 'D2', 'C2', 'C10']);
  });

  it('shows since when and why a charger is out of service', async () => {
    await render();
    const d2 = [...el.querySelectorAll('tr[mat-row]')].find((r) => r.textContent?.includes('D2'))!;
    expect(d2.textContent).toContain('Out of service');
    expect(d2.textContent).toMatch(/since .*2026.*08:05/);
  });

  it('offers edit and remove only to editors', async () => {
    await render(true);
    expect(el.querySelector('button[aria-label="Edit charger D1"]')).not.toBeNull();
    expect(el.querySelector('button[aria-label="Remove charger D1"]')).not.toBeNull();
    fixture.destroy();
    await render(false);
    expect(el.querySelectorAll('tr[mat-row]')).toHaveLength(4);
    expect(el.querySelector('button[aria-label^="Edit charger"]')).toBeNull();
    expect(el.querySelector('button[aria-label^="Remove charger"]')).toBeNull();
  });
});
