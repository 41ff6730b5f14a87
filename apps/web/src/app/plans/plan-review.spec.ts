import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { settle } from '../testing/fixtures';
import type { PlanResult } from '@nightyard/contracts';
import { busRows, reasonText } from './plan-format';
import { PLAN_IDS, planDetail, planResult, planSummary } from './plan-fixtures';
import { PlanReview } from './plan-review';
import { BusPlanTable } from './bus-plan-table';

describe('plan review', () => {
  it('sorts short buses first, the largest shortfall first, then by bus number', () => {
    const rows = busRows(planDetail());
    expect(rows.map((r) => [r.bus, r.short, r.reason])).toEqual([
      ['203', true, 'Site service limit'],
      ['205', true, 'Dwell too short'],
      ['201', false, ''],
    ]);
    expect(rows[1]!.departures).toEqual([{ at: 'Fri 06:10', socPct: (98 / 155) * 100 }]);
    expect(rows[0]!.chargers).toBe('C1');
  });

  it("marks the plug-ins and unplugs the bus's driver makes, in the run sheets' words", async () => {
    const plan = planDetail();
    const [first, ...rest] = plan.result!.sessions;
    const result = {
      ...plan.result!,
      sessions: [{ ...first!, startMove: 'driver' as const, endMove: 'crew' as const }, ...rest],
    };
    expect(busRows({ ...plan, result }).find((r) => r.bus === '201')!.sessions[0]).toMatchObject({
      plugInByDriver: true,
      unplugByDriver: false,
    });
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const fixture = TestBed.createComponent(BusPlanTable);
    fixture.componentRef.setInput('rows', busRows({ ...plan, result }));
    fixture.detectChanges();
    const row = [...(fixture.nativeElement as HTMLElement).querySelectorAll('tbody tr')]
      .map((r) => r.textContent!.replace(/\s+/g, ' '))
      .find((t) => t.includes(' 201 '))!;
    expect(row).toMatch(/18:00 Driver, on pulling in ?Thu 18:30/);
    expect(row).not.toContain('on pulling out');
  });

  it('words every engine reason plainly', () => {
    expect(['dwell', 'charger', 'cabinet', 'site', 'taper', null].map(reasonText)).toEqual([
      'Dwell too short',
      'Not enough charger time',
      'Power cabinet limit',
      'Site service limit',
      'Battery taper',
      'Not enough energy',
    ]);
  });

  /** The review of the fixture plan with `changes` to its result: the text of the card labelled `label`. */
  async function costCard(changes: Partial<PlanResult>, label = 'Projected cost'): Promise<string> {
    TestBed.resetTestingModule(); // a test may read more than one review
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const fixture = TestBed.createComponent(PlanReview);
    const plan = planDetail();
    const result = { ...plan.result!, ...changes };
    fixture.componentRef.setInput('plan', { ...plan, result } as typeof plan & { result: PlanResult });
    fixture.componentRef.setInput('versions', [planSummary()]);
    TestBed.tick();
    await settle();
    fixture.detectChanges();
    const cards = [...(fixture.nativeElement as HTMLElement).querySelectorAll('.card')];
    const card = cards.find((c) => c.querySelector('.card-label')?.textContent?.trim() === label)!;
    return card.textContent!.replace(/\s+/g, ' ');
  }

  it('says "Extra energy cost" where the plan pays more for energy than the baseline, not a negative saving', async () => {
    const card = await costCard({ cost: { energy: 20.41, demand: 89.98, total: 110.39 } });
    // $0.41 more than $20.00: 2.1 %, with its digit below 1 % (0.4 % read "-0 %").
    expect(card).toContain('Extra energy cost $0.41 (2 % more) against charge on arrival $20.00');
    expect(card).not.toContain('Energy saving');
    // A plan made without the crew (older plans: no crewMoves) gives no reason it cannot know.
    expect(card).not.toContain("crew's hours");
  });

  it('the cost card is never a cent off itself: the parts foot to the total, the saving is the shown difference', async () => {
    // Unrounded, 10.004 + 89.984 = 99.988 and 20.006 - 10.004 = 10.002. Each rounded alone: $10.00
    // + $89.98 beside $99.99, and a saving of $10.00 beside $20.01 and $10.00.
    const card = await costCard({
      cost: { energy: 10.004, demand: 89.984, total: 99.988 },
      baseline: { ...planDetail().result!.baseline, energy: 20.006 },
    });
    const cents = [...card.matchAll(/\$([\d,]+\.\d\d)/g)].map((m) => Math.round(Number(m[1]!.replace(/,/g, '')) * 100));
    const [total, energy, demand, saving, baseline] = cents;
    expect(total).toBe(9999);
    expect(energy! + demand!).toBe(total);
    expect(baseline).toBe(2001);
    expect(saving).toBe(baseline! - energy!);
  });

  it("splits a re-plan's whole-night cost at its cut-off, the two parts footing to the total shown", async () => {
    // The night's cost $99.99 (unrounded 99.988): the re-plan from 23:00 $40.01 (40.005), so the
    // hours before it $59.98, not the $59.983 rounded alone ($59.98 + $40.01 = $99.99).
    const card = await costCard({
      cost: { energy: 10.004, demand: 89.984, total: 99.988 },
      replan: {
        from: '2026-01-14T23:00:00.000-06:00',
        own: { cost: { energy: 10.005, demand: 30, total: 40.005 }, lowerBound: 40 },
      },
    });
    expect(card).toContain('Before 23:00, as drawn: $59.98; from 23:00 on (this re-plan): $40.01');
    // A night planned whole says nothing of a split.
    expect(await costCard({})).not.toContain('as drawn');
  });

  it('says when a plan made during its night was made and the quarter-hour it plans from', async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const fixture = TestBed.createComponent(PlanReview);
    const plan = planDetail({ plannedFrom: '2026-01-14T22:49' });
    const result = {
      ...plan.result!,
      replan: { from: '2026-01-14T23:00:00.000-06:00', own: { cost: plan.result!.cost, lowerBound: 0 } },
    };
    fixture.componentRef.setInput('plan', { ...plan, result } as typeof plan & { result: PlanResult });
    fixture.componentRef.setInput('versions', [planSummary()]);
    TestBed.tick();
    await settle();
    fixture.detectChanges();
    const note = (fixture.nativeElement as HTMLElement).querySelector('[aria-label="Planned from"]');
    expect(note?.textContent?.replace(/\s+/g, ' ')).toContain(
      'The night was under way when this plan was made, at 22:49: it plans from 23:00 on, the next quarter-hour.',
    );
  });

  it("says why a plan with the crew's rules can pay more for energy than the baseline", async () => {
    const card = await costCard({ crewMoves: 6, cost: { energy: 20.04, demand: 89.98, total: 110.02 } });
    expect(card).toContain('Extra energy cost $0.04');
    expect(card).toMatch(
      /Charge on arrival does not keep to the crew's hours( or the demand target)?: it swaps buses whenever a charger frees up, whoever is in the yard/,
    );
  });

  it("says when the gap is to a bound that leaves out the crew's hours", async () => {
    const gap = { lowerBound: 209.16, gap: 0.6488, cost: { energy: 158.05, demand: 437.58, total: 595.63 } };
    expect(await costCard({ ...gap, boundKeepsCrew: false }, 'Gap to lower bound')).toContain(
      "This bound leaves out the crew's hours (any bus on any free charger at any time): a plan that keeps to them may not reach it",
    );
    // A bound that keeps the crew's rules, and plans made before the engine said which, say nothing of it.
    for (const keeps of [true, undefined])
      expect(await costCard({ ...gap, boundKeepsCrew: keeps }, 'Gap to lower bound')).not.toContain("crew's hours");
  });

  it('shows the short buses first with their reasons, and the figures', async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const mock = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(PlanReview);
    fixture.componentRef.setInput('plan', planDetail() as ReturnType<typeof planDetail> & { result: PlanResult });
    fixture.componentRef.setInput('versions', [
      planSummary(),
      planSummary({ id: PLAN_IDS.published, version: 1, state: 'published' }),
    ]);
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;

    const rows = [...el.querySelectorAll('ny-bus-plan-table tbody tr')].map((r) =>
      [...r.querySelectorAll('th, td')].map((c) => c.textContent?.replace(/\s+/g, ' ').trim()).join(' | '),
    );
    expect(rows[0]).toMatch(/^warning 203 \| C1 \| .* \| 30 \| Site service limit/);
    expect(rows[1]).toMatch(/^warning 205 \| C2 \| .* \| 12\.5 \| Dwell too short/);
    expect(rows[2]).toContain('Leaves with its energy');
    expect(el.querySelector('.short-banner')?.textContent).toContain('2 buses leave');
    const cards = [...el.querySelectorAll('.card')].map((c) => c.textContent?.replace(/\s+/g, ' ').trim());
    expect(cards[0]).toContain('$100.00');
    // Against the baseline on energy: $10 planned, $20 charging on arrival.
    expect(cards[0]).toContain('Energy saving $10.00 (50 %) against charge on arrival $20.00');
    expect(cards[1]).toContain('120 kW');
    expect(cards[1]).toContain('Service limit 150 kW');
    // A short plan's bound holds only for plans at most as short (30 + 12.5 kWh here).
    expect(cards[2]).toContain('1 %');
    expect(cards[2]).toContain('No plan short by 42.5 kWh or less can cost less than $99.00');
    expect(cards[3]).toContain('2');

    mock.expectOne(`/api/plans/${PLAN_IDS.draft}/compare?with=${PLAN_IDS.published}`).flush({
      from: { id: PLAN_IDS.published, version: 1, kind: 'generated' },
      to: { id: PLAN_IDS.draft, version: 2, kind: 'generated' },
      moved: [{ bus: '205', before: 'C2 17:00-18:00', after: 'C2 18:30-19:00' }],
      costChange: -12.5,
      inputChanges: ["The billing period's facility peak so far 250 kW in version 1, 280 kW in version 2"],
    });
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    fixture.detectChanges();
    const compare = el.querySelector('ny-plan-compare')!.textContent!.replace(/\s+/g, ' ');
    expect(compare).toContain('Against version 1: 1 bus moved, the cost is $12.50 lower.');
    // A cost that fell with the inputs says so, not only that the plan is cheaper.
    expect(compare).toContain(
      "planned from different inputs, so the cost difference is not the plan's alone: The billing period's facility peak so far 250 kW in version 1, 280 kW in version 2.",
    );
    mock.verify();
  });

  it('puts the demand target beside the service limit, and the trade when the plan goes above it', async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const mock = TestBed.inject(HttpTestingController);
    const trade =
      'Raising the target by 20 kW costs $150.00 this month (20 kW x $7.50/kW) and keeps bus 207 from being 12 kWh short.';
    const peakCard = async (target: PlanResult['target']) => {
      const fixture = TestBed.createComponent(PlanReview);
      fixture.componentRef.setInput(
        'plan',
        planDetail({ result: planResult({ target }) }) as ReturnType<typeof planDetail> & { result: PlanResult },
      );
      fixture.componentRef.setInput('versions', [planSummary()]);
      TestBed.tick();
      await settle();
      fixture.detectChanges();
      const el = fixture.nativeElement as HTMLElement;
      const card = [...el.querySelectorAll('.card')][1]!;
      return [...card.querySelectorAll('span')].map((x) => x.textContent!.replace(/\s+/g, ' ').trim()).join(' | ');
    };
    const above = await peakCard({
      peaks: [{ name: 'facility', kw: 120, targetKw: 100 }],
      aboveKw: 20,
      trade: {
        above: [{ name: 'facility', kw: 20, rate: 7.5 }],
        cost: 150,
        keepsServed: [{ bus: '207', kwh: 12 }],
        energySaved: 0,
        sentence: trade,
      },
      binding: null,
      impossible: [],
    });
    expect(above).toContain('Service limit 150 kW | Demand target 100 kW');
    expect(above).toContain(`20 kW above the target. ${trade}`);
    const within = await peakCard({
      peaks: [
        { name: 'facility', kw: 95, targetKw: 100 },
        { name: 'on-peak', kw: 40, targetKw: 48 },
      ],
      aboveKw: 0,
      trade: null,
      binding: null,
      impossible: [],
    });
    expect(within).toContain('Demand target 100 kW');
    expect(within).toContain('Period targets: on-peak 48 kW');
    expect(within).toContain('Within the target: this night adds no demand charge to the month');
    expect(within).not.toContain('above the target');
    // A plan without a target (older plans, what-ifs) shows none.
    expect(await peakCard(undefined)).not.toContain('Demand target');
    mock.match(() => true);
  });

  it('warns on a plan that draws above a service limit lowered since it was made', async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const mock = TestBed.inject(HttpTestingController);
    const note = async (state: 'published' | 'superseded', serviceLimitKw: number | undefined) => {
      const fixture = TestBed.createComponent(PlanReview);
      const plan = planDetail({ state }) as ReturnType<typeof planDetail> & { result: PlanResult };
      fixture.componentRef.setInput('plan', plan);
      fixture.componentRef.setInput('versions', [planSummary()]);
      fixture.componentRef.setInput('serviceLimitKw', serviceLimitKw);
      TestBed.tick();
      await settle();
      fixture.detectChanges();
      const peak = Math.max(...plan.result.slots.map((s) => s.loadKw));
      const el = (fixture.nativeElement as HTMLElement).querySelector('[data-fact="limit-lowered"]');
      return { peak, text: el?.textContent?.replace(/\s+/g, ' ').trim() ?? null };
    };
    // The fixture's plan peaks under its 150 kW limit; the depot's is now below that peak.
    const { peak } = await note('published', undefined);
    const below = Math.floor(peak) - 10;
    expect((await note('published', below)).text).toBe(
      `The service limit is now ${below} kW, below this plan's peak (it was made under 150 kW). Generate the night again so it keeps to the new limit, and publish it.`,
    );
    // A superseded version is history: said, with nothing to do.
    expect((await note('superseded', below)).text).toBe(
      `The service limit is now ${below} kW, below this plan's peak (it was made under 150 kW).`,
    );
    // Lowered, but still above the peak: nothing to say.
    expect((await note('published', Math.ceil(peak) + 1)).text).toBeNull();
    expect((await note('published', undefined)).text).toBeNull();
    mock.match(() => true);
  });

  it("says which buses' runs changed since the version was made, and what to do", async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const mock = TestBed.inject(HttpTestingController);
    const banner = async (runsChanged: string[], state: 'published' | 'draft' = 'published') => {
      const fixture = TestBed.createComponent(PlanReview);
      fixture.componentRef.setInput(
        'plan',
        planDetail({ state, runsChanged }) as ReturnType<typeof planDetail> & {
          result: PlanResult;
        },
      );
      fixture.componentRef.setInput('versions', [planSummary()]);
      TestBed.tick();
      await settle();
      fixture.detectChanges();
      const el = (fixture.nativeElement as HTMLElement).querySelector('[data-fact="runs-changed"]');
      return el?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
    };
    expect(await banner([])).toBeNull();
    expect(await banner(['202'])).toBe(
      'updateThe runs of bus 202 changed since this plan was made (their times, or the energy they need): it may not serve them. Generate the night again and publish it.',
    );
    expect(await banner(['201', '202', '203', '204', '205', '206', '207'], 'draft')).toBe(
      'updateThe runs of buses 201, 202, 203, 204, 205 and 2 more changed since this plan was made (their times, or the energy they need): it may not serve them. Generate the night again.',
    );
    mock.match(() => true);
  });

  it('names a what-if as such when comparing with it', async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const mock = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(PlanReview);
    const whatIf = '00000000-0000-4000-8000-0000000000f3';
    fixture.componentRef.setInput(
      'plan',
      planDetail({ version: 4 }) as ReturnType<typeof planDetail> & { result: PlanResult },
    );
    fixture.componentRef.setInput('versions', [
      planSummary({ version: 4 }),
      planSummary({ id: whatIf, version: 3, kind: 'what-if' }),
    ]);
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    fixture.detectChanges();
    mock.expectOne(`/api/plans/${PLAN_IDS.draft}/compare?with=${whatIf}`).flush({
      from: { id: whatIf, version: 3, kind: 'what-if' },
      to: { id: PLAN_IDS.draft, version: 4, kind: 'generated' },
      moved: [{ bus: '205', before: 'C3 17:00-18:00', after: 'C2 18:30-19:00' }],
      costChange: 12.5,
      inputChanges: [],
    });
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    fixture.detectChanges();
    const compare = fixture.nativeElement.querySelector('ny-plan-compare') as HTMLElement;
    expect(compare.textContent).toContain('Against what-if version 3: 1 bus moved, the cost is $12.50 higher.');
    expect([...compare.querySelectorAll('thead th')].map((th) => th.textContent?.trim())).toEqual([
      'Bus',
      'What-if version 3',
      'Version 4',
    ]);
    mock.verify();
  });
});
