import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import type { Role } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { ratePlan } from '../shared/setup-fixtures';
import { settle, tokenResponse } from '../testing/fixtures';
import { checkDefinition, definitionOf, ratePlanForm } from './rate-plan-form';
import { RatePlanEditorPage } from './rate-plan-editor-page';
import { UrdbDraft } from './urdb-draft';

describe('RatePlanEditorPage', () => {
  let fixture: ComponentFixture<RatePlanEditorPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  async function signIn(roles: Role[]) {
    const store = TestBed.inject(AuthStore);
    const signingIn = store.signIn('ada@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
    await signingIn;
  }

  async function render(roles: Role[] = ['facilities'], inputs: Record<string, string> = {}) {
    await signIn(roles);
    fixture = TestBed.createComponent(RatePlanEditorPage);
    for (const [k, v] of Object.entries(inputs)) fixture.componentRef.setInput(k, v);
    el = fixture.nativeElement;
    await refresh();
  }

  /** Runs change detection and the resources' loaders; never waits for an unanswered request (whenStable would). */
  async function refresh() {
    await settle();
    TestBed.tick();
    await settle();
    fixture.detectChanges();
  }

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    mock = TestBed.inject(HttpTestingController);
  });

  afterEach(() => mock.verify());

  function field(scope: Element, label: string): HTMLInputElement {
    const l = [...scope.querySelectorAll('label')].find((x) => x.textContent?.trim().replace(/\s*\*$/, '') === label);
    if (!l) throw new Error(`No field labelled ${label}`);
    return el.querySelector<HTMLInputElement>(`#${l.getAttribute('for')}`)!;
  }

  function type(input: HTMLInputElement, value: string) {
    input.value = value;
    input.dispatchEvent(new Event('input'));
    input.dispatchEvent(new Event('blur'));
  }

  function button(text: string, scope: Element = el): HTMLButtonElement {
    const b = [...scope.querySelectorAll('button')].find((x) =>
      x.textContent?.replace(/\s+/g, ' ').trim().endsWith(text),
    );
    if (!b) throw new Error(`No button ${text}`);
    return b;
  }

  function checkbox(scope: Element, label: string): HTMLInputElement {
    return [...scope.querySelectorAll('mat-checkbox')]
      .find((c) => c.textContent?.trim() === label)!
      .querySelector('input')!;
  }

  const win = (key: string) => el.querySelector(`[data-window="${key}"]`)!;

  it('builds the definition from the form and shows a server error on the right window', async () => {
    await render();
    expect(el.querySelector('h1')?.textContent).toBe('New rate plan');
    type(field(el, 'Rate plan name'), 'Evening peak');
    type(field(el, 'Off-peak price'), '0.09');
    type(field(el, 'Facility demand charge'), '14.25');
    button('Add period to season 1').click();
    await refresh();

    const period = el.querySelector('fieldset.period')!;
    type(field(period, 'Period name'), 'on-peak');
    type(field(period, 'Energy price'), '0.2854');
    type(field(period, 'Demand charge'), '6');
    type(field(win('0.0.0'), 'From'), '16:00');
    type(field(win('0.0.0'), 'To'), '21:00');
    button('Add window', period).click();
    await refresh();
    checkbox(win('0.0.1'), 'Weekdays').click();
    checkbox(win('0.0.1'), 'Weekends').click();
    checkbox(win('0.0.1'), 'Holidays').click();
    type(field(win('0.0.1'), 'From'), '22:00');
    type(field(win('0.0.1'), 'To'), '06:00');
    await refresh();
    expect(win('0.0.1').textContent).toContain('runs past midnight');
    expect(win('0.0.0').textContent).not.toContain('runs past midnight');

    button('Save rate plan').click();
    await refresh();
    const req = mock.expectOne('/api/rate-plans');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({
      name: 'Evening peak',
      definition: {
        currency: 'USD',
        seasons: [
          {
            name: 'All year',
            fromMonth: 1,
            toMonth: 12,
            offPeakPrice: 0.09,
            facilityDemandCharge: 14.25,
            periods: [
              {
                name: 'on-peak',
                price: 0.2854,
                demandCharge: 6,
                windows: [
                  { dayTypes: ['weekday'], from: '16:00', to: '21:00' },
                  { dayTypes: ['weekend', 'holiday'], from: '22:00', to: '06:00' },
                ],
              },
            ],
            energyBlocks: [],
          },
        ],
        fixedCharges: [],
        holidays: [],
        demandRatchet: null,
        minimumCharge: null,
      },
    });

    req.flush(
      {
        error: {
          code: 'validation_failed',
          message: 'Check definition.seasons[0].periods[0].windows[1]',
          fields: {
            'definition.seasons[0].periods[0].windows[1]':
              'Overlaps "on-peak" 16:00-21:00 on weekends from 22:00 to 23:00',
          },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await refresh();
    expect(win('0.0.1').querySelector('.window-error')?.textContent).toContain(
      'Overlaps "on-peak" 16:00-21:00 on weekends',
    );
    expect(win('0.0.0').querySelector('.window-error')).toBeNull();
    const live = el.querySelector('ny-problem-summary [aria-live="assertive"]')!;
    expect(live.textContent).toContain('Nothing was saved.');
    expect(live.textContent).toContain('Season 1, period 1, window 2: Overlaps');
  });

  it("catches overlapping windows before sending, with the contract's words", () => {
    const form = ratePlanForm('Broken', {
      currency: 'USD',
      seasons: [
        {
          name: 'All',
          fromMonth: 1,
          toMonth: 12,
          offPeakPrice: 0.05,
          facilityDemandCharge: 0,
          periods: [
            {
              name: 'p',
              price: 0.2,
              demandCharge: 0,
              windows: [
                { dayTypes: ['weekday'], from: '16:00', to: '20:00' },
                { dayTypes: ['weekday', 'weekend'], from: '19:00', to: '21:00' },
              ],
            },
          ],
          energyBlocks: [],
        },
      ],
      fixedCharges: [],
      holidays: [],
      demandRatchet: null,
      minimumCharge: null,
    });
    expect(form.valid).toBe(true);
    checkDefinition(form);
    expect(form.get('seasons.0.periods.0.windows.1')?.getError('server')).toBe(
      'Overlaps "p" 16:00-20:00 on weekdays from 19:00 to 20:00',
    );
    expect(form.get('seasons.0.periods.0.windows.0')?.errors).toBeNull();
  });

  it('round-trips an existing plan unchanged', () => {
    const plan = ratePlan();
    expect(definitionOf(ratePlanForm(plan.name, plan.definition))).toEqual(plan.definition);
  });

  it('round-trips energy blocks, a demand ratchet and a minimum bill', () => {
    const base = ratePlan().definition;
    const def = {
      ...base,
      seasons: base.seasons.map((s, i) =>
        i === 0
          ? {
              ...s,
              energyBlocks: [
                { uptoKwh: 1000, adder: 0 },
                { uptoKwh: null, adder: -0.015 },
              ],
            }
          : s,
      ),
      demandRatchet: { percent: 80, months: 11 },
      minimumCharge: { amount: 25, per: 'month' as const },
    };
    const form = ratePlanForm('Tiered', def);
    expect(form.valid).toBe(true);
    expect(definitionOf(form)).toEqual(def);
    expect(checkDefinition(form)).toEqual([]);
  });

  it('labels the block, ratchet and minimum bill controls and names a block that is not last but open-ended', async () => {
    await render(['facilities']);
    button('Add energy block to season 1').click();
    await refresh();
    for (const label of [
      'Block 1 ends at',
      'Block 1 price change',
      'Block 2 ends at',
      'Ratchet percentage',
      'Minimum bill',
    ]) {
      expect(field(el, label)).toBeTruthy();
    }
    expect(el.textContent).toContain(
      'from the meter readings imported under Costs, the published plans and the peaks entered under Depot',
    );
  });

  it('opens an imported URDB plan for review, with its notes', async () => {
    const plan = ratePlan({ name: 'Prairie Wind: General Service TOU' });
    TestBed.inject(UrdbDraft).set({
      name: plan.name,
      definition: plan.definition,
      notes: ['Energy period 0 has 2 tiers; the first tier is used.'],
      fileName: 'urdb.json',
    });
    await render(['facilities'], { from: 'urdb' });
    expect(el.querySelector('h1')?.textContent).toBe('Check the imported rate plan');
    expect(el.textContent).toContain('Energy period 0 has 2 tiers; the first tier is used.');
    expect(field(el, 'Rate plan name').value).toBe('Prairie Wind: General Service TOU');
    button('Save rate plan').click();
    await refresh();
    const req = mock.expectOne('/api/rate-plans');
    expect(req.request.body.definition).toEqual(plan.definition);
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    req.flush(
      { ratePlan: { ...plan, id: '00000000-0000-4000-8000-0000000000f9' } },
      { status: 201, statusText: 'Created' },
    );
    await refresh();
    expect(navigate).toHaveBeenCalledWith(['/rates', '00000000-0000-4000-8000-0000000000f9']);
  });

  it('shows the plan as text, with no form, to a role that only reads', async () => {
    const plan = ratePlan();
    await render(['finance'], { id: plan.id });
    mock.expectOne(`/api/rate-plans/${plan.id}`).flush({ ratePlan: plan });
    await refresh();
    expect(el.querySelector('form')).toBeNull();
    expect(el.querySelector('input')).toBeNull();
    expect([...el.querySelectorAll('button')].map((b) => b.textContent?.trim())).not.toContain('Save rate plan');
    expect(el.textContent).toContain('Facilities managers and administrators change them.');
    expect(el.textContent).toContain('Customer charge: $45.00 per month');
  });
});
