import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { DepotListStore } from '../depot-state/depot-list-store';
import { depot } from '../testing/fixtures';
import { Clock } from './clock';
import { DepotTimeNote, VIEWER_TIME_ZONE } from './depot-time-note';

describe('DepotTimeNote', () => {
  async function render(viewerZone: string, depotZone: string): Promise<string> {
    TestBed.configureTestingModule({
      providers: [
        { provide: VIEWER_TIME_ZONE, useValue: viewerZone },
        { provide: DepotListStore, useValue: { current: signal(depot({ timezone: depotZone })) } },
      ],
    });
    // Winter at the depot, whatever this machine's date.
    TestBed.inject(Clock).setServerTime(Date.parse('2026-12-02T21:42:00Z'));
    const fixture = TestBed.createComponent(DepotTimeNote);
    await fixture.whenStable();
    return (fixture.nativeElement as HTMLElement).textContent?.trim() ?? '';
  }

  it("says once that the page's times are the depot's when the viewer is elsewhere", async () => {
    expect(await render('Europe/London', 'America/Chicago')).toBe(
      'scheduleTimes are at the depot: America/Chicago (CST), 24-hour.',
    );
  });

  it('says nothing when the viewer is at the depot', async () => {
    expect(await render('America/Chicago', 'America/Chicago')).toBe('');
  });
});
