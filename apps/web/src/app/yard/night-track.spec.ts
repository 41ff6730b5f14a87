import { TestBed } from '@angular/core/testing';
import { NightTrack } from './night-track';
import { ZONE, at, plan } from './yard-fixtures';

describe('NightTrack', () => {
  async function render(now: string) {
    const fixture = TestBed.createComponent(NightTrack);
    const tonightsPlan = plan();
    fixture.componentRef.setInput('charger', 'C1');
    fixture.componentRef.setInput(
      'sessions',
      tonightsPlan.sessions.filter((s) => s.charger === 'C1'),
    );
    fixture.componentRef.setInput('horizon', tonightsPlan.horizon);
    fixture.componentRef.setInput('now', Date.parse(now));
    fixture.componentRef.setInput('timezone', ZONE);
    await fixture.whenStable();
    fixture.detectChanges();
    return fixture.nativeElement as HTMLElement;
  }

  it('draws the now-line where now falls across the night and greys plug-ins that have ended', async () => {
    const el = await render(at('23:30'));
    const now = el.querySelector<HTMLElement>('.now')!;
    // 18:00 to 07:00 is 13 h; 23:30 is 5.5 h in.
    expect(parseFloat(now.style.left)).toBeCloseTo((5.5 / 13) * 100, 3);
    expect(now.textContent?.trim()).toBe('Now 23:30');
    const bars = [...el.querySelectorAll<HTMLElement>('.bar')];
    expect(bars.map((b) => [b.dataset['session'], b.classList.contains('past')])).toEqual([
      ['201', true],
      ['202', false],
    ]);
    expect(el.querySelector('.track')?.getAttribute('aria-label')).toBe(
      'Charger C1 from 18:00 to 07:00: bus 201 21:00 to 23:00, bus 202 23:30 to 02:00. Now 23:30.',
    );
  });

  it('has no now-line before the night starts', async () => {
    const el = await render(at('17:00'));
    expect(el.querySelector('.now')).toBeNull();
  });
});
