import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import type { Role } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { DEPOT_ID, depotDetail, ratePlan } from '../shared/setup-fixtures';
import { depot, settle, tokenResponse } from '../testing/fixtures';
import { RatesPage } from './rates-page';
import { UrdbDraft } from './urdb-draft';

describe('RatesPage', () => {
  let fixture: ComponentFixture<RatesPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    mock = TestBed.inject(HttpTestingController);
  });

  afterEach(() => mock.verify());

  async function render(roles: Role[], plans = [ratePlan()]) {
    const store = TestBed.inject(AuthStore);
    const signingIn = store.signIn('ada@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
    await signingIn;
    fixture = TestBed.createComponent(RatesPage);
    el = fixture.nativeElement;
    mock.expectOne('/api/depots').flush({ depots: [depot({ id: DEPOT_ID })] });
    await settle();
    mock.expectOne('/api/rate-plans').flush({ ratePlans: plans });
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({ depot: depotDetail() });
    await refresh();
  }

  async function refresh() {
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  it('gives editors the import, new plan and assignment controls', async () => {
    await render(['facilities']);
    expect(el.querySelector('input[type="file"]')).not.toBeNull();
    expect(el.querySelector('label[for="urdb-file"]')?.textContent).toContain('Import URDB file');
    expect(el.textContent).toContain('New rate plan');
    expect(el.textContent).toContain('Assign to depot');
    expect(el.querySelector('[aria-label="Edit Commercial TOU"]')).not.toBeNull();
  });

  it('counts a period priced in two seasons once', async () => {
    const plan = ratePlan();
    const [summer, winter] = plan.definition.seasons;
    const both = {
      ...plan,
      definition: { ...plan.definition, seasons: [summer!, { ...winter!, periods: summer!.periods }] },
    };
    await render(['finance'], [both]);
    expect(el.textContent!.replace(/\s+/g, ' ')).toContain('Off-peak and 1 time-of-use period ·');
  });

  it("shows a finance user the plans and the depot's assignment read-only", async () => {
    await render(['finance']);
    expect(el.textContent).toContain('Commercial TOU');
    expect(el.textContent).toContain('In force today');
    // The off-peak hours are billed too: the count of periods says so (Costs bills both).
    expect(el.textContent!.replace(/\s+/g, ' ')).toMatch(/Off-peak and \d+ time-of-use periods? ·/);
    expect(el.querySelector('input[type="file"]')).toBeNull();
    expect(el.querySelector('form')).toBeNull();
    expect(el.textContent).not.toContain('New rate plan');
    expect(el.querySelector('[aria-label^="Edit "]')).toBeNull();
    expect(el.querySelector('[aria-label^="Remove "]')).toBeNull();
    expect(el.querySelector('[aria-label^="Remove the rate plan"]')).toBeNull();
    expect(el.querySelector('[aria-label="Preview Commercial TOU"]')).not.toBeNull();
  });

  async function upload(name: string, text: string) {
    const input = el.querySelector<HTMLInputElement>('input[type="file"]')!;
    const file = new File([text], name, { type: 'application/json' });
    Object.defineProperty(input, 'files', { value: [file], configurable: true });
    input.dispatchEvent(new Event('change'));
    await refresh();
  }

  it('sends an uploaded URDB file as it is and opens the mapped plan for review', async () => {
    await render(['facilities']);
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    const text = '{"label":"x","energyratestructure":[]}';
    await upload('tariff.json', text);
    const req = mock.expectOne('/api/rate-plans/import-urdb');
    expect(req.request.body).toBe(text);
    expect(req.request.headers.get('Content-Type')).toBe('application/json');
    req.flush({ name: 'Mapped', definition: ratePlan().definition, notes: ['A note'] });
    await refresh();
    expect(TestBed.inject(UrdbDraft).value()?.fileName).toBe('tariff.json');
    expect(navigate).toHaveBeenCalledWith(['/rates/new'], { queryParams: { from: 'urdb' } });
  });

  it('names the file and each field when the URDB record cannot be imported', async () => {
    await render(['facilities']);
    await upload('broken.json', '{"label": ');
    mock.expectNone('/api/rate-plans/import-urdb');
    expect(el.querySelector('ny-problem-summary')?.textContent).toContain('broken.json is not JSON.');

    // A picture chosen by mistake: said plainly, none of its bytes echoed.
    await upload('meter.png', '\u0089PNG\r\n\u001a\n\u0000\u0000\u0000\rIHDR');
    mock.expectNone('/api/rate-plans/import-urdb');
    const said = el.querySelector('ny-problem-summary')?.textContent ?? '';
    expect(said).toContain('meter.png is not a text file (it looks like a picture or another binary file)');
    expect(said).not.toContain('IHDR');

    await upload('bad.json', '{"label":"x"}');
    mock.expectOne('/api/rate-plans/import-urdb').flush(
      {
        error: {
          code: 'validation_failed',
          message: 'This URDB record cannot be imported: check energyweekdayschedule[2][14]',
          fields: { 'energyweekdayschedule[2][14]': 'Period 9 is not in energyratestructure (it has periods 0-3)' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await refresh();
    const summary = el.querySelector('ny-problem-summary')!.textContent!;
    expect(summary).toContain('bad.json could not be imported.');
    expect(summary).toContain('energyweekdayschedule[2][14]: Period 9 is not in energyratestructure');
    expect(summary).toContain('Nothing was saved.');
  });
});
