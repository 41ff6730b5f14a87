import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { DEPOT_ID, depotDetail } from '../shared/setup-fixtures';
import { settle } from '../testing/fixtures';
import { YardCrewPanel, daysText } from './yard-crew-panel';

describe('YardCrewPanel', () => {
  let fixture: ComponentFixture<YardCrewPanel>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  beforeEach(async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    mock = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(YardCrewPanel);
    fixture.componentRef.setInput('depotId', DEPOT_ID);
    fixture.componentRef.setInput('yardCrew', depotDetail().yardCrew);
    fixture.componentRef.setInput('canEdit', true);
    el = fixture.nativeElement;
    await refresh();
  });

  afterEach(() => mock.verify());

  async function refresh() {
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  const button = (text: string) =>
    [...el.querySelectorAll('button')].find((b) => b.textContent?.replace(/\s+/g, ' ').trim().endsWith(text))!;
  function field(label: string): HTMLInputElement {
    const l = [...el.querySelectorAll('label')].find((x) => x.textContent?.trim() === label)!;
    return el.querySelector<HTMLInputElement>(`#${l.getAttribute('for')}`)!;
  }

  it('shows the crew in the same terms as the plans, then saves a changed shift', async () => {
    const text = el.textContent!.replace(/\s+/g, ' ');
    expect(text).toContain('45 min');
    expect(text).toContain('Drivers plug in on pulling in and unplug on pulling out');
    expect(text).toContain('15:00-23:30 every day, 3 moves per 15 min; 04:30-07:00 every day, 2 moves per 15 min');
    // The tolerance's amount as money in the rate plan's currency (it read "or 5 in the rate plan's currency").
    fixture.componentRef.setInput('currency', 'USD');
    await refresh();
    expect(el.textContent!.replace(/\s+/g, ' ')).toMatch(/% of the night's cost or \$\d+\.\d\d, whichever is larger/);
    button('Edit yard crew').click();
    await refresh();
    const to = field('Shift 1 to');
    to.value = '23:00';
    to.dispatchEvent(new Event('input'));
    await refresh();
    button('Save yard crew').click();
    await refresh();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/yard-crew`);
    expect(req.request.method).toBe('PUT');
    expect(req.request.body.shifts[0]).toEqual({ from: '15:00', to: '23:00', movesPerSlot: 3 });
    expect(req.request.body.costTolerancePercent).toBe(0.5);
    req.flush({ yardCrew: req.request.body });
    await refresh();
  });

  it('keeps a shift to weekdays: the days ticked are saved, and said in short', async () => {
    button('Edit yard crew').click();
    await refresh();
    const day = (name: string) =>
      el.querySelector<HTMLInputElement>(
        `mat-checkbox[aria-label="Shift 2 on ${name}"] input, input[aria-label="Shift 2 on ${name}"]`,
      )!;
    for (const name of ['Saturday', 'Sunday']) {
      day(name).click();
      await refresh();
    }
    button('Save yard crew').click();
    await refresh();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/yard-crew`);
    expect(req.request.body.shifts[1]).toEqual({ from: '04:30', to: '07:00', movesPerSlot: 2, days: [1, 2, 3, 4, 5] });
    // Every day ticked: no list, as before days existed.
    expect(req.request.body.shifts[0]).not.toHaveProperty('days');
    req.flush({ yardCrew: req.request.body });
    await refresh();
    // The depot page passes the saved crew back in.
    fixture.componentRef.setInput('yardCrew', req.request.body);
    await refresh();
    expect(el.textContent!.replace(/\s+/g, ' ')).toContain('04:30-07:00 Mon-Fri, 2 moves per 15 min');
    expect(daysText([6, 7])).toBe('Sat, Sun');
    expect(daysText([1, 2, 3, 5])).toBe('Mon-Wed, Fri');
  });

  it('says a shift that ends when it starts, and moves below 1, in words before saving', async () => {
    button('Edit yard crew').click();
    await refresh();
    const set = async (label: string, value: string) => {
      const f = field(label);
      f.value = value;
      f.dispatchEvent(new Event('input'));
      f.dispatchEvent(new Event('blur'));
      await refresh();
    };
    await set('Shift 2 to', '04:30');
    await set('Shift 2 crew moves per 15 minutes', '0');
    await set('Shift 1 from', '25:00');
    button('Save yard crew').click();
    await refresh();
    mock.expectNone(`/api/depots/${DEPOT_ID}/yard-crew`);
    const text = el.textContent!.replace(/\s+/g, ' ');
    expect(text).toContain('A shift must end at another time than it starts');
    expect(text).toContain('At least 1 move');
    expect(text).not.toContain('Too small');
    expect(text).toContain('Write the time as HH:mm, 00:00 to 23:59');
    expect(text).not.toContain('pattern');
    expect(text).toContain('Check the fields marked in red.');
    // Put right, the message goes.
    await set('Shift 2 to', '07:00');
    expect(el.textContent).not.toContain('A shift must end at another time than it starts');
  });
});
