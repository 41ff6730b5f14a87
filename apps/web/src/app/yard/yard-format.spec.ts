import { at, step, tonight, ZONE } from './yard-fixtures';
import {
  atOdds,
  expectedAtFor,
  hourTicks,
  isNightAt,
  dueText,
  liveView,
  nextHour,
  nextSteps,
  overdueSteps,
  nowLinePct,
  revisionNotice,
  spansDays,
  stepViews,
} from './yard-format';

describe('yard format', () => {
  const now = Date.parse(at('22:30'));

  it('picks per charger the step due now or next; an overdue step waits in its own list and never hides it', () => {
    const views = stepViews(tonight().steps, now, ZONE);
    const next = nextSteps(views);
    expect(next.get('C1')?.sentence).toBe('Unplug bus 201 from charger C1 at 23:00');
    expect(next.get('C2')?.sentence).toBe('Unplug bus 203 from charger C2 at 05:00');
    expect(overdueSteps(views.filter((v) => v.step.charger === 'C2')).map((v) => v.title)).toEqual([
      'Plug in bus 203 at charger C2',
    ]);
    expect(dueText(next.get('C1')!, now)).toBe('Next, in 30 min (23:00)');
  });

  it('names the day with each step of a night longer than a day, where 15:00 comes round more than once', () => {
    const steps = [
      step({ action: 'connect', bus: '218', charger: 'C1', at: '2026-12-04T17:00:00.000-06:00' }),
      step({ action: 'disconnect', bus: '218', charger: 'C1', at: '2026-12-06T15:00:00.000-06:00' }),
    ];
    const weekend = { start: Date.parse('2026-12-04T15:45:00-06:00'), end: Date.parse('2026-12-07T07:00:00-06:00') };
    expect(spansDays(weekend)).toBe(true);
    expect(spansDays({ start: weekend.start, end: weekend.start + 15 * 3_600_000 })).toBe(false);
    const views = stepViews(steps, now, ZONE, undefined, spansDays(weekend));
    expect(views.map((v) => v.sentence)).toEqual([
      'Plug in bus 218 at charger C1 at Fri 17:00',
      'Unplug bus 218 from charger C1 at Sun 15:00',
    ]);
  });

  it('takes the words of a step from the server: an unplug forced by a report is due now and says where the bus goes', () => {
    const text = 'Unplug bus 218 from charger C3 now (out of service), then move it to charger C5 for 22:45';
    const steps = [
      step({
        action: 'disconnect',
        bus: '218',
        charger: 'C3',
        at: at('22:27'),
        text,
        reason: 'Charger C3 out of service (cable cut)',
        moveTo: { charger: 'C5', at: at('22:45') },
      }),
      step({ action: 'connect', bus: '218', charger: 'C5', at: at('22:45') }),
      step({ action: 'connect', bus: '203', charger: 'C2', at: at('21:00'), status: 'missed' }),
    ];
    const views = stepViews(steps, now, ZONE);
    const unplug = nextSteps(views).get('C3')!;
    expect(unplug).toMatchObject({
      title: text,
      sentence: `${text} (reported 22:27)`,
      reason: 'Charger C3 out of service (cable cut)',
    });
    expect(dueText(unplug, now)).toBe('Due now (22:27)');
    expect(views.find((v) => v.step.bus === '203')!.state).toBe('missed');
    expect(overdueSteps(views)).toEqual([]);
  });

  it('lists the next hour across chargers in time order: due now and up to 60 minutes ahead, not overdue, not done', () => {
    const views = stepViews(
      [
        ...tonight().steps,
        step({ action: 'connect', bus: '204', charger: 'C3', at: at('22:30') }),
        step({ action: 'connect', bus: '205', charger: 'C2', at: at('23:31') }),
      ],
      now,
      ZONE,
    );
    expect(nextHour(views, now).map((v) => `${v.time} ${v.title}`)).toEqual([
      '22:30 Plug in bus 204 at charger C3',
      '23:00 Unplug bus 201 from charger C1',
      '23:30 Plug in bus 202 at charger C1',
    ]);
  });

  it('skips a step being saved and puts an unplug before a plug-in at the same time', () => {
    const steps = [
      step({ action: 'connect', bus: '202', charger: 'C1', at: at('23:00') }),
      step({ action: 'disconnect', bus: '201', charger: 'C1', at: at('23:00') }),
      step({ action: 'disconnect', bus: '202', charger: 'C1', at: at('02:00') }),
    ];
    const views = stepViews(steps, now, ZONE, (key) =>
      key.startsWith('disconnect|201') ? { state: 'saving', retrying: false, message: null } : null,
    );
    expect(views.map((v) => v.step.action + v.step.bus)).toEqual(['disconnect201', 'connect202', 'disconnect202']);
    expect(views[0]!.state).toBe('saving');
    expect(nextSteps(views).get('C1')?.title).toBe('Plug in bus 202 at charger C1');
  });

  it('marks steps overdue ten minutes after their time, and done with who and when', () => {
    const views = stepViews(tonight().steps, now, ZONE);
    expect(views.find((v) => v.step.bus === '201' && v.step.action === 'connect')).toMatchObject({
      state: 'done',
      doneNote: 'Done 21:02 by Kofi Brandt',
    });
    const upcoming = step({ action: 'connect', bus: '9', charger: 'C9', at: at('22:25') });
    expect(stepViews([upcoming], now, ZONE)[0]!.state).toBe('upcoming');
    expect(stepViews([upcoming], Date.parse(at('22:36')), ZONE)[0]!.state).toBe('overdue');
  });

  it('puts the now-line where now falls across the night, and none outside it', () => {
    const h = tonight().plan!.horizon!;
    expect(new Date(h.start).toISOString()).toBe(at('18:00'));
    expect(new Date(h.end).toISOString()).toBe(at('07:00'));
    // 18:00 to 07:00 is 13 h; 22:30 is 4.5 h in.
    expect(nowLinePct(now, h)).toBeCloseTo((4.5 / 13) * 100, 6);
    expect(nowLinePct(Date.parse(at('17:00')), h)).toBeNull();
    expect(nowLinePct(h.end, h)).toBe(100);
    expect(hourTicks(h, ZONE, 3).map((t) => t.label)).toEqual(['18:00', '21:00', '00:00', '03:00', '06:00']);
    // A weeknight's card gets a tick every 3 hours; a weekend's every 12, midnight named by its day.
    expect(hourTicks(h, ZONE).map((t) => t.label)).toEqual(['18:00', '21:00', '00:00', '03:00', '06:00']);
    const weekend = {
      start: Date.parse('2026-12-04T15:45:00-06:00'),
      end: Date.parse('2026-12-07T07:00:00-06:00'),
      slotMs: 900_000,
    };
    expect(hourTicks(weekend, ZONE).map((t) => t.label)).toEqual(['Sat', '12:00', 'Sun', '12:00', 'Mon']);
  });

  it('turns a late bus time into the next time the depot clock reads it', () => {
    expect(expectedAtFor('23:40', now, ZONE)).toBe('2026-12-01T23:40');
    expect(expectedAtFor('01:15', now, ZONE)).toBe('2026-12-02T01:15');
    expect(expectedAtFor('22:30', now, ZONE)).toBe('2026-12-02T22:30');
    // Past midnight an earlier time is today's, passed (the server refuses it), not tomorrow's.
    const morning = Date.parse(at('05:05')); // Wednesday morning
    expect(expectedAtFor('04:00', morning, ZONE)).toBe('2026-12-02T04:00');
    expect(expectedAtFor('06:10', morning, ZONE)).toBe('2026-12-02T06:10');
  });

  it("is night while the server's night (tonight's plan) is under way, not by the clock on the wall", () => {
    const h = tonight().plan!.horizon!;
    expect(isNightAt(h.start, h)).toBe(true);
    expect(isNightAt(h.end - 1, h)).toBe(true);
    expect(isNightAt(h.start - 1, h)).toBe(false);
    expect(isNightAt(h.end, h)).toBe(false);
    expect(isNightAt(now, null)).toBe(false);
  });

  it("says what a revision changed, from the plan's revision note", () => {
    const plan = tonight().plan!;
    const revised = {
      ...plan,
      version: 3,
      kind: 'revision' as const,
      publishedBy: 'Kofi Brandt',
      revisionNote: 'Revised at 23:05: charger C1 out of service (cable cut).',
    };
    expect(revisionNotice(revised, ZONE)).toBe(
      'Plan revised at 23:05 (version 3): charger C1 out of service (cable cut). Reported by Kofi Brandt.',
    );
    expect(revisionNotice({ ...plan, version: 2 }, ZONE)).toBe(
      'A new plan was published at 10:00 (version 2) by Sam Reyes. Check your next steps.',
    );
  });

  it('says how many buses a revision moved and why, as the e-mail does', () => {
    const plan = tonight().plan!;
    const revised = {
      ...plan,
      version: 2,
      kind: 'revision' as const,
      publishedBy: 'Kofi Brandt',
      revisionNote: 'Revised at 19:34: charger C2 out of service (cable cut).',
      moved: {
        buses: ['202', '204', '214'],
        reasons: ['charger C2 out of service: 3 buses were planned on it'],
        againstVersion: null,
      },
    };
    expect(revisionNotice(revised, ZONE)).toBe(
      'Plan revised at 19:34 (version 2): charger C2 out of service (cable cut). Reported by Kofi Brandt. ' +
        '3 buses moved from 19:34 on, because: charger C2 out of service: 3 buses were planned on it.',
    );
    // A night planned again and published: what changed against the version the yard had.
    const again = { ...plan, version: 2, moved: { buses: ['216'], reasons: ['x'], againstVersion: 1 } };
    expect(revisionNotice(again, ZONE)).toBe(
      'A new plan was published at 10:00 (version 2) by Sam Reyes. Against version 1: 1 bus changes charger or times (216). Check your next steps.',
    );
    expect(revisionNotice({ ...again, moved: { buses: [], reasons: [], againstVersion: 1 } }, ZONE)).toContain(
      'Against version 1: no bus changes charger or times.',
    );
  });

  it("says where a charger's own report disagrees with the step confirmed on it, once it has had time to catch up", () => {
    const c1 = stepViews(tonight().steps, now, ZONE).filter((v) => v.step.charger === 'C1');
    // 201 confirmed plugged in at 21:02.
    expect(atOdds(c1, { status: 'available', seenAt: at('21:30') }, ZONE)).toBe(
      'Charger C1 reports nothing plugged in (at 21:30), but bus 201 was confirmed plugged in at 21:02. ' +
        'Check that the connector is seated and that the bus is on this charger; if it still does not take a charge, report it.',
    );
    // Agreeing, reported before the confirmation, or within the charger's two minutes to catch up: nothing to say.
    expect(atOdds(c1, { status: 'connected', seenAt: at('21:30') }, ZONE)).toBeNull();
    expect(atOdds(c1, { status: 'charging', seenAt: at('21:30') }, ZONE)).toBeNull();
    expect(atOdds(c1, { status: 'available', seenAt: at('20:55') }, ZONE)).toBeNull();
    expect(atOdds(c1, { status: 'available', seenAt: at('21:03') }, ZONE)).toBeNull();
    expect(atOdds(c1, { status: 'available', seenAt: null }, ZONE)).toBeNull();
    expect(atOdds(c1, null, ZONE)).toBeNull();
    // The last confirmation counts: 201 unplugged at 23:01, yet the charger draws power at 23:10
    // with 202's plug-in not due before 23:30.
    const later = tonight().steps.map((s) =>
      s.action === 'disconnect' && s.bus === '201'
        ? { ...s, status: 'done' as const, confirmedAt: at('23:01'), confirmedBy: 'Kofi Brandt' }
        : s,
    );
    const after = stepViews(later, Date.parse(at('23:10')), ZONE).filter((v) => v.step.charger === 'C1');
    expect(atOdds(after, { status: 'charging', seenAt: at('23:10') }, ZONE)).toBe(
      'Charger C1 is charging a bus (at 23:10), but bus 201 was confirmed unplugged at 23:01 and no plug-in is due on it yet. Check which bus is on this charger.',
    );
    // Plugged in and not drawing (a station between two sessions may say so), or 202's plug-in
    // due and not confirmed (an overdue step says it): nothing more.
    expect(atOdds(after, { status: 'connected', seenAt: at('23:10') }, ZONE)).toBeNull();
    expect(atOdds(after, { status: 'charging', seenAt: at('23:31') }, ZONE)).toBeNull();
    expect(atOdds(after, { status: 'available', seenAt: at('23:10') }, ZONE)).toBeNull();
  });

  it('tells a charger with a bus plugged in and not drawing from an available one', () => {
    expect(
      liveView(
        { live: { status: 'connected', powerKw: 0, seenAt: at('22:29') }, status: 'in_service', statusReason: null },
        ZONE,
      ).text,
    ).toBe('Plugged in, not charging (at 22:29)');
  });

  it('says out of service where the station of a charger taken out of use still reports itself available', () => {
    const available = { status: 'available' as const, powerKw: 0, seenAt: at('07:53') };
    const d2 = { live: available, status: 'out_of_service' as const, statusReason: 'Cable worn' };
    expect(liveView(d2, ZONE, true)).toEqual({ icon: 'block', text: 'Out of service', tone: 'off', faulted: false });
    // Power flowing or a fault is still what the station says.
    expect(liveView({ ...d2, live: { ...available, status: 'charging', powerKw: 35.7 } }, ZONE, true).text).toBe(
      'Charging at 35.7 kW (at 07:53)',
    );
    expect(liveView({ ...d2, live: { ...available, status: 'faulted' } }, ZONE, true).faulted).toBe(true);
  });

  it("describes a charger's live state with an icon and words", () => {
    expect(
      liveView(
        { live: { status: 'faulted', powerKw: null, seenAt: at('22:29') }, status: 'in_service', statusReason: null },
        ZONE,
      ),
    ).toEqual({
      icon: 'report',
      text: 'Faulted (at 22:29)',
      tone: 'fault',
      faulted: true,
    });
    expect(
      liveView(
        { live: { status: 'charging', powerKw: 42.25, seenAt: null }, status: 'in_service', statusReason: null },
        ZONE,
      ).text,
    ).toBe('Charging at 42.3 kW');
    expect(liveView(null, ZONE).text).toBe('No live report');
  });
});
