import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { computed, signal } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialog } from '@angular/material/dialog';
import { provideRouter } from '@angular/router';
import type { Tonight } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { DepotListStore } from '../depot-state/depot-list-store';
import { depot, settle } from '../testing/fixtures';
import { FakeLiveTransport, provideFakeLive } from '../testing/live-fake';
import { OUTBOX_STORAGE_KEY } from './confirmation-outbox';
import { DEPOT_ID, PLAN_ID, at, charger, plan, step, tonight } from './yard-fixtures';
import { YardPage } from './yard-page';
import { YardStore } from './yard-store';

describe('YardPage', () => {
  let fixture: ComponentFixture<YardPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const open = vi.fn();

  async function render(): Promise<void> {
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  function answer(t: Tonight, chargers = [charger('C1'), charger('C2'), charger('C3')]): void {
    mock.expectOne(`/api/depots/${DEPOT_ID}/tonight`).flush(t);
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({ depot: { id: DEPOT_ID, chargers } });
  }

  async function start(t: Tonight = tonight(), chargers?: ReturnType<typeof charger>[], night?: string): Promise<void> {
    const current = signal(depot({ id: DEPOT_ID }));
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        provideFakeLive(),
        { provide: MatDialog, useValue: { open } },
        { provide: AuthStore, useValue: { user: signal({ id: 'user-1' }) } },
        {
          provide: DepotListStore,
          useValue: { load: () => Promise.resolve(), state: signal('loaded'), current: computed(() => current()) },
        },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(YardPage);
    if (night) fixture.componentRef.setInput('night', night);
    el = fixture.nativeElement;
    await render();
    answer(t, chargers);
    await render();
  }

  const card = (label: string) => el.querySelector<HTMLElement>(`ny-charger-card[data-charger="${label}"]`)!;
  const text = (node: Element | null) => node?.textContent?.replace(/\s+/g, ' ').trim() ?? '';

  beforeEach(() => localStorage.clear());
  afterEach(() => {
    mock.verify();
    document.documentElement.style.colorScheme = '';
  });

  it("says on a charger's card where its own report disagrees with the plug-in confirmed on it", async () => {
    // 201 confirmed plugged in at 21:02; C1 reported nothing plugged in at 22:29 (the fixture's live state).
    await start(tonight(), [
      charger('C1'),
      charger('C2', { live: { status: 'connected', powerKw: 0, seenAt: at('22:29') } }),
      charger('C3'),
    ]);
    const odds = card('C1').querySelector('.at-odds');
    expect(odds?.getAttribute('role')).toBe('status');
    expect(text(odds)).toContain(
      'Charger C1 reports nothing plugged in (at 22:29), but bus 201 was confirmed plugged in at 21:02.',
    );
    expect(card('C2').querySelector('.at-odds')).toBeNull();
  });

  it("shows each charger's step due now or next in big type, overdue ones apart, done ones greyed", async () => {
    await start();
    expect(text(el.querySelector('h1'))).toBe('Yard');
    expect(text(card('C1').querySelector('.next .sentence'))).toBe('Unplug bus 201 from charger C1 at 23:00');
    expect(text(card('C1').querySelector('.next .when'))).toContain('Next, in 30 min (23:00)');
    // C2's 22:00 plug-in is overdue: it waits in its own list; the card leads with what is next.
    const c2 = card('C2').querySelector('.next')!;
    expect(text(c2.querySelector('.sentence'))).toBe('Unplug bus 203 from charger C2 at 05:00');
    // Who makes the move, as the run sheet says it: the driver pulling out here, the crew on C1.
    expect(text(c2.querySelector('.by'))).toBe('By: Driver, on pulling out');
    expect(text(card('C1').querySelector('.next .by'))).toBe('By: Crew');
    expect(text(c2)).toContain('High voltage: trained and authorised staff only');
    const overdue = card('C2').querySelector('.overdue-list')!;
    expect(text(overdue.querySelector('h3'))).toBe('warning Overdue on C2: 1');
    expect(text(overdue.querySelector('ny-overdue-step'))).toContain('Plug in bus 203 at charger C2');
    expect(text(overdue.querySelector('ny-overdue-step'))).toContain('Due 22:00, 30 min ago');
    expect(text(overdue)).toContain('High voltage: trained and authorised staff only');
    expect(card('C1').querySelector('.overdue-list')).toBeNull();
    expect(text(card('C3'))).toContain('No bus is planned on C3 tonight');
    const done = card('C1').querySelector('li[data-state="done"]')!;
    expect(text(done)).toContain('Done 21:02 by Kofi Brandt');
    expect(card('C1').querySelectorAll('li[data-state="upcoming"]')).toHaveLength(3);
    expect(text(card('C2').querySelector('li[data-state="overdue"]'))).toContain('Overdue');
    expect(text(el.querySelector('.status-bar'))).toContain('1 overdue');
    // 22:30 at the depot and the theme menu on "Match device": night colours.
    expect(document.documentElement.style.colorScheme).toBe('dark');
  });

  it('an e-mail link for tonight shows tonight as usual; one for another night says what is shown instead', async () => {
    const t = tonight();
    await start(t, undefined, t.plan!.serviceDate);
    expect(el.querySelector('.linked-night')).toBeNull();
    fixture.componentRef.setInput('night', '2099-01-01');
    await render();
    expect(text(el.querySelector('.linked-night'))).toMatch(
      /^The link was for the night of Thursday 1 January: its steps show here when that night begins/,
    );
    fixture.componentRef.setInput('night', '2000-01-03');
    await render();
    expect(text(el.querySelector('.linked-night'))).toBe(
      "The night of Monday 3 January is over: this is tonight's plan.",
    );
  });

  it("takes now from the server and keeps day colours before the server's night starts", async () => {
    // 17:00 at the depot, whatever this machine's clock says; tonight's plan starts at 18:00.
    await start(tonight({ now: at('17:00') }));
    expect(text(el.querySelector('.status-bar'))).toContain('Now 17:00');
    expect(text(el.querySelector('.night'))).toContain('The night starts');
    expect(document.documentElement.style.colorScheme).toBe('');
  });

  it("darkens for the server's night (from its first pull-in), not from a fixed hour", async () => {
    // Tonight's first pull-in is at 15:00; at 16:00 the night is under way.
    const horizon = { start: Date.parse(at('15:00')), end: Date.parse(at('07:00')), slotMs: 15 * 60_000 };
    await start(tonight({ now: at('16:00'), plan: plan({ horizon }) }));
    expect(text(el.querySelector('.status-bar'))).toContain('Now 16:00');
    expect(document.documentElement.style.colorScheme).toBe('dark');
  });

  it('asks for the cautions at the start of a shift before showing the steps', async () => {
    await start(tonight({ acknowledged: false }));
    expect(text(el)).toContain('Only trained and authorised staff connect or disconnect chargers.');
    expect(text(el)).toContain('NFPA 70 / NEC Article 625, NFPA 70E, OSHA');
    expect(text(el)).toContain('The plan is advisory: the people on site decide.');
    expect(el.querySelector('ny-charger-card')).toBeNull();
    [...el.querySelectorAll('button')].find((b) => text(b).includes('I have read the cautions'))!.click();
    mock
      .expectOne({ method: 'POST', url: `/api/depots/${DEPOT_ID}/tonight/acknowledge` })
      .flush(null, { status: 204, statusText: 'No Content' });
    await render();
    expect(el.querySelector('ny-charger-card')).not.toBeNull();
  });

  it('confirms the next step through the outbox: saving, then saved, then the next one', async () => {
    await start();
    const button = card('C1').querySelector<HTMLButtonElement>('.next button')!;
    expect(button.getAttribute('aria-label')).toBe('Confirm unplugged: bus 201 from charger C1');
    button.click();
    await render();
    expect(JSON.parse(localStorage.getItem(OUTBOX_STORAGE_KEY)!)).toHaveLength(1);
    expect(text(card('C1').querySelector('.last-done'))).toContain('Unplug bus 201 from charger C1: Saving…');
    expect(text(card('C1').querySelector('.next .sentence'))).toBe('Plug in bus 202 at charger C1 at 23:30');
    const req = mock.expectOne('/api/yard/confirmations');
    req.flush({ stepKey: req.request.body.stepKey, confirmedAt: at('22:31'), confirmedBy: 'Kofi Brandt' });
    await render();
    expect(text(card('C1').querySelector('.last-done'))).toContain('Saved. Done 22:31 by Kofi Brandt');
    // A confirmation reloads tonight.
    answer(tonight());
    await render();
  });

  it('an unplug whose plug-in nobody confirmed is asked about once more, pointing to the plug-in', async () => {
    // Bus 203's 22:00 plug-in on C2 is overdue; its unplug is moved to 22:45, due within the hour.
    const t = tonight();
    await start(
      tonight({
        steps: t.steps.map((x) =>
          x.action === 'disconnect' && x.bus === '203' ? step({ ...x, at: at('22:45'), by: 'crew' }) : x,
        ),
      }),
    );
    const next = () => card('C2').querySelector('.next')!;
    next().querySelector<HTMLButtonElement>('button.confirm')!.click();
    await render();
    mock.expectNone('/api/yard/confirmations');
    expect(text(next().querySelector('.ask-early'))).toContain(
      "Bus 203's plug-in on C2 (due 22:00) is not confirmed: confirm it below with the time it happened first. Was bus 203 really unplugged from C2 now?",
    );
  });

  it('a step more than an hour ahead is asked about once more before it is saved', async () => {
    await start();
    // C2's next step is its 05:00 unplug, six and a half hours after 22:30.
    const next = () => card('C2').querySelector('.next')!;
    const button = next().querySelector<HTMLButtonElement>('button.confirm')!;
    expect(button.getAttribute('aria-label')).toBe('Confirm unplugged: bus 203 from charger C2');
    button.click();
    await render();
    mock.expectNone('/api/yard/confirmations');
    const ask = () => next().querySelector('.ask-early');
    expect(text(ask())).toMatch(/^This step is due 05:00, in 6 h 3\d min\. Was it really done now\?/);
    [...ask()!.querySelectorAll('button')].find((b) => text(b) === 'Cancel')!.click();
    await render();
    expect(ask()).toBeNull();
    mock.expectNone('/api/yard/confirmations');
    button.click();
    await render();
    [...ask()!.querySelectorAll('button')].find((b) => text(b) === 'Yes, it is done')!.click();
    await render();
    const req = mock.expectOne('/api/yard/confirmations');
    expect(req.request.body.stepKey).toBe(`disconnect|203|C2|${at('05:00')}`);
    req.flush({ stepKey: req.request.body.stepKey, confirmedAt: at('22:31'), confirmedBy: 'Kofi Brandt' });
    await render();
    answer(tonight());
    await render();
  });

  it('tells the yard in the app when the plan changes version', async () => {
    await start();
    expect(el.querySelector('.notice')).toBeNull();
    void fixture.debugElement.injector.get(YardStore).load();
    const revised = plan({
      version: 2,
      kind: 'revision',
      publishedBy: 'Kofi Brandt',
      revisionNote: 'Revised at 22:40: charger C2 out of service (cable cut).',
    });
    answer(tonight({ plan: revised, now: at('22:41') }));
    await render();
    expect(text(el.querySelector('.notice'))).toContain(
      'Plan revised at 22:40 (version 2): charger C2 out of service (cable cut). Reported by Kofi Brandt.',
    );
    expect(text(el.querySelector('.status-bar'))).toContain('Plan version 2 (revised)');

    // A reload before "Got it" shows it again (it had gone, unread by whoever held the phone).
    const reload = async () => {
      fixture.destroy();
      fixture = TestBed.createComponent(YardPage);
      el = fixture.nativeElement;
      await render();
      answer(tonight({ plan: revised, now: at('22:43') }));
      await render();
    };
    await reload();
    expect(text(el.querySelector('.notice'))).toContain('Plan revised at 22:40 (version 2)');
    [...el.querySelectorAll<HTMLButtonElement>('.notice button')].find((b) => text(b) === 'Got it')!.click();
    await render();
    expect(el.querySelector('.notice')).toBeNull();
    await reload();
    expect(el.querySelector('.notice')).toBeNull();
  });

  it('offers a prefilled out-of-service report when a charger reports a fault', async () => {
    open.mockReturnValue({ afterClosed: () => ({ subscribe: () => undefined }) });
    await start(tonight(), [
      charger('C1', { live: { status: 'faulted', powerKw: null, seenAt: at('22:20') } }),
      charger('C2'),
    ]);
    expect(text(card('C1').querySelector('.live'))).toContain('Faulted (at 22:20)');
    [...card('C1').querySelectorAll('button')].find((b) => text(b) === 'build Report charger out of service')!.click();
    expect(open.mock.calls[0]![1].data.preset).toEqual({
      kind: 'charger_out',
      charger: 'C1',
      reason: 'The charger reported a fault at 22:20',
    });
  });

  it('shows a fault pushed over the live stream at once and offers the report from it', async () => {
    open.mockReturnValue({ afterClosed: () => ({ subscribe: () => undefined }) });
    await start();
    expect(el.querySelector('[data-fault]')).toBeNull();
    TestBed.inject(FakeLiveTransport).last.events.next({
      type: 'charger',
      at: at('22:31'),
      charger: { chargerId: 'charger-C2', label: 'C2', status: 'faulted', powerKw: null, seenAt: at('22:31') },
    });
    await render();
    expect(text(card('C2').querySelector('.live'))).toContain('Faulted (at 22:31)');
    const notice = el.querySelector<HTMLElement>('[data-fault="C2"]')!;
    expect(text(notice)).toContain('Charger C2 reports a fault (since 22:31, depot time)');
    notice.querySelector('button')!.click();
    expect(open.mock.calls.at(-1)![1].data.preset).toEqual({
      kind: 'charger_out',
      charger: 'C2',
      reason: 'The charger reported a fault at 22:31',
    });
  });

  it('asks for the cautions first when a fault arrives before the shift has acknowledged them', async () => {
    await start(tonight({ acknowledged: false }), [
      charger('C1', { live: { status: 'faulted', powerKw: null, seenAt: at('22:20') } }),
    ]);
    const notice = el.querySelector('[data-fault="C1"]')!;
    expect(text(notice)).toContain("Acknowledge the shift's cautions below, then report it out of service");
    expect(notice.querySelector('button')).toBeNull();
  });

  it('confirms an overdue step with the time it happened; a time that is not HH:mm is refused in place', async () => {
    await start();
    const item = card('C2').querySelector('ny-overdue-step')!;
    const input = item.querySelector<HTMLInputElement>('input')!;
    expect(item.querySelector('label')?.textContent).toContain('Done at (depot time)');
    expect(input.value).toBe('22:00');
    const confirm = [...item.querySelectorAll('button')].find((b) => text(b) === 'check Confirm done')!;
    input.value = '25:00';
    input.dispatchEvent(new Event('input'));
    confirm.click();
    await render();
    expect(text(item.querySelector('mat-error'))).toContain('HH:mm');
    mock.expectNone('/api/yard/confirmations');
    input.value = '22:04';
    input.dispatchEvent(new Event('input'));
    confirm.click();
    await render();
    const req = mock.expectOne('/api/yard/confirmations');
    expect(req.request.body).toEqual({ planId: PLAN_ID, stepKey: `connect|203|C2|${at('22:00')}`, at: '22:04' });
    req.flush({ stepKey: req.request.body.stepKey, confirmedAt: at('22:04'), confirmedBy: 'Kofi Brandt' });
    await render();
    answer(tonight());
    await render();
  });

  it('a step that did not happen is asked once more, then re-planned and published: the notice says so', async () => {
    await start();
    const item = () => card('C2').querySelector('ny-overdue-step')!;
    [...item().querySelectorAll('button')].find((b) => text(b) === 'block Did not happen')!.click();
    await render();
    expect(text(item().querySelector('.ask'))).toContain(
      'Bus 203 is taken as not plugged in, and the rest of the night is re-planned.',
    );
    // The button pressed gave way to the question: the focus is on its answer, not lost.
    expect(text(document.activeElement)).toBe('Yes, it did not happen');
    [...item().querySelectorAll('button')].find((b) => text(b) === 'Yes, it did not happen')!.click();
    await render();
    const req = mock.expectOne({ method: 'POST', url: `/api/depots/${DEPOT_ID}/tonight/missed` });
    expect(req.request.body).toEqual({ planId: PLAN_ID, stepKey: `connect|203|C2|${at('22:00')}` });
    req.flush({
      revision: { version: 2 },
      moved: [{ bus: '203', before: 'C2 22:00', after: 'C2 22:45' }],
      replanMs: 40,
      notified: 2,
      effect: {
        costBefore: 10,
        costAfter: 10,
        demandBefore: 0,
        demandAfter: 0,
        peakBeforeKw: 60,
        peakAfterKw: 60,
        short: [],
        lines: ["The night's projected cost is unchanged: $10.00."],
      },
    });
    await render();
    const revised = plan({
      version: 2,
      kind: 'revision',
      revisionNote: 'Revised at 22:30: "Plug in bus 203 at charger C2" (due 22:00) did not happen.',
    });
    answer(tonight({ plan: revised, steps: tonight().steps.filter((s) => s.bus !== '203') }));
    await render();
    expect(text(el.querySelector('.notice'))).toContain(
      'Plan revised at 22:30 (version 2): "Plug in bus 203 at charger C2" (due 22:00) did not happen.',
    );
    expect(text(el.querySelector('.notice'))).toContain('Bus 203: C2 22:00 → C2 22:45');
    // What it does to the night, as the e-mail says it.
    expect(text(el.querySelector('.notice'))).toContain("The night's projected cost is unchanged: $10.00.");
    expect(card('C2').querySelector('.overdue-list')).toBeNull();
    // The answer is made far down a phone's page and its step leaves the card: the notice is
    // where the focus goes (and so is seen and read out).
    expect(document.activeElement).toBe(el.querySelector('.notice'));
  });

  it('lists the next hour across all chargers in time order, with the cautions', async () => {
    await start(
      tonight({ steps: [...tonight().steps, step({ action: 'connect', bus: '204', charger: 'C3', at: at('22:40') })] }),
    );
    const region = el.querySelector('ny-next-hour')!;
    expect(region.getAttribute('role')).toBe('region');
    expect(text(region.querySelector('h2'))).toBe('Next hour, all chargers');
    const items = [...region.querySelectorAll('li')].map(
      (li) => `${text(li.querySelector('.time'))} ${text(li.querySelector('.title'))}`,
    );
    // Up to 23:30 (an hour from 22:30); the overdue 22:00 plug-in is in C2's own list, not here.
    expect(items).toEqual([
      '22:40 Plug in bus 204 at charger C3',
      '23:00 Unplug bus 201 from charger C1',
      '23:30 Plug in bus 202 at charger C1',
    ]);
    expect(text(region)).toContain('High voltage: trained and authorised staff only');
  });

  it('after a charger is reported out, its card, the next hour and the run sheet all say to unplug the bus now', async () => {
    const words = 'Unplug bus 201 from charger C1 now (out of service), then move it to charger C3 for 22:45';
    const steps = [
      step({
        action: 'connect',
        bus: '201',
        charger: 'C1',
        at: at('21:00'),
        status: 'done',
        confirmedAt: at('21:02'),
        confirmedBy: 'Kofi Brandt',
      }),
      step({
        action: 'disconnect',
        bus: '201',
        charger: 'C1',
        at: at('22:27'),
        text: words,
        reason: 'Charger C1 out of service (cable cut)',
        moveTo: { charger: 'C3', at: at('22:45') },
        // Its charging was planned for later in the night: none before the report.
        kwh: 0,
      }),
      step({ action: 'connect', bus: '201', charger: 'C3', at: at('22:45') }),
    ];
    await start(tonight({ steps }), [
      charger('C1', { status: 'out_of_service', statusReason: 'cable cut' }),
      charger('C2'),
      charger('C3'),
    ]);
    const c1 = card('C1');
    expect(text(c1.querySelector('.out-note'))).toBe(
      'block Out of service: cable cut. Unplug the bus on it (below); nothing else is planned on it.',
    );
    expect(c1.querySelector('.next')!.classList.contains('urgent')).toBe(true);
    expect(text(c1.querySelector('.next .when'))).toContain('Due now (22:27)');
    expect(text(c1.querySelector('.next .reason'))).toBe('Charger C1 out of service (cable cut)');
    expect(text(c1.querySelector('.next .sentence'))).toBe(`${words} (reported 22:27)`);
    expect(text(c1.querySelector('.next'))).toContain('No charging planned in this plug-in');
    expect(text(c1.querySelector('.next'))).not.toContain('After 0 kWh');
    // Nothing is to be plugged into C1 any more (its 21:00 plug-in stays in the history, done).
    expect(c1.querySelectorAll('li[data-step^="connect|"]:not([data-state="done"])')).toHaveLength(0);
    expect(text(el.querySelector('ny-next-hour li'))).toContain(words);
    await render();
    const sheet = document.querySelector('.ny-run-sheets')!;
    expect(text(sheet)).toContain(words);
  });

  it('a charger out for a period still to come is in service until then, and says when it goes out', async () => {
    await start(tonight(), [
      charger('C1'),
      // Now is 22:30 at the depot: out from 23:30 tonight to 05:00.
      charger('C2', {
        status: 'out_of_service',
        statusReason: 'inspection',
        outFrom: '2026-12-01T23:30',
        outUntil: '2026-12-02T05:00',
      }),
      charger('C3', { status: 'out_of_service', statusReason: 'cable cut' }),
    ]);
    const c2 = card('C2');
    expect(c2.querySelector('.out-note')).toBeNull();
    expect(text(c2.querySelector('.out-later span'))).toBe(
      'Out of service from 2026-12-01 23:30 until 2026-12-02 05:00 (inspection): no bus is planned on it then.',
    );
    // Out without a period: out now.
    expect(card('C3').querySelector('.out-note')).not.toBeNull();
  });

  it('says plainly when there is no plan', async () => {
    await start(tonight({ plan: null, steps: [] }));
    expect(text(el)).toContain('There is no published plan for tonight or a later night at North Depot');
  });
});
