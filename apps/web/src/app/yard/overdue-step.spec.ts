import { TestBed } from '@angular/core/testing';
import { settle } from '../testing/fixtures';
import { OverdueStep, type ConfirmAt } from './overdue-step';
import { step } from './yard-fixtures';
import { spansDays, stepViews } from './yard-format';

describe('OverdueStep', () => {
  it('on a weekend\'s night, starts the time field at the step\'s HH:mm (not "Fri 17:00") and confirms with it', async () => {
    // Friday 17:00 to Monday 07:00: the night names each step's day.
    const weekend = { start: Date.parse('2026-12-04T15:45:00-06:00'), end: Date.parse('2026-12-07T07:00:00-06:00') };
    const now = Date.parse('2026-12-04T17:35:00-06:00');
    const [view] = stepViews(
      [step({ action: 'connect', bus: '205', charger: 'C5', at: '2026-12-04T17:00:00.000-06:00' })],
      now,
      'America/Chicago',
      undefined,
      spansDays(weekend),
    );
    expect(view!.time).toBe('Fri 17:00');
    expect(view!.clockTime).toBe('17:00');
    const fixture = TestBed.createComponent(OverdueStep);
    fixture.componentRef.setInput('view', view);
    fixture.componentRef.setInput('now', now);
    const confirmed: ConfirmAt[] = [];
    fixture.componentInstance.confirmAt.subscribe((c) => confirmed.push(c));
    await settle();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('input')!.value).toBe('17:00');
    expect(el.textContent).toContain('Due Fri 17:00, 35 min ago');
    [...el.querySelectorAll('button')].find((b) => b.textContent?.includes('Confirm done'))!.click();
    await settle();
    fixture.detectChanges();
    // Before, the field held "Fri 17:00" and the form refused its own value as not HH:mm.
    expect(el.querySelector('mat-error')).toBeNull();
    expect(confirmed.map((c) => c.at)).toEqual(['17:00']);
  });
});
