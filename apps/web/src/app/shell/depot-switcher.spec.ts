import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ChangeDetectionStrategy, Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { FormControl } from '@angular/forms';
import { MatDialog } from '@angular/material/dialog';
import { Router, provideRouter } from '@angular/router';
import { depotLinkGuard } from '../depot-state/depot-link-guard';
import type { Role } from '@nightyard/contracts';
import { of } from 'rxjs';
import { AuthStore } from '../auth/auth-store';
import { trackUnsaved } from '../core/unsaved-edits';
import { DepotListStore } from '../depot-state/depot-list-store';
import { BusesPage } from '../fleet/buses-page';
import { bus } from '../fleet/fleet-fixtures';
import { FakeLiveTransport, provideFakeLive } from '../testing/live-fake';
import { NORTH_ID, SOUTH_ID, depot, settle, southDepot, tokenResponse } from '../testing/fixtures';
import { TonightPage } from '../tonight/tonight-page';
import { Shell } from './shell';

/** A page with a form, standing for the sections' forms with a Save. */
@Component({ selector: 'ny-edit-probe', template: '<p>Editing</p>', changeDetection: ChangeDetectionStrategy.OnPush })
class EditProbe {
  readonly form = new FormControl('');
  constructor() {
    trackUnsaved(
      () => this.form.dirty,
      () => 'the probe',
    );
  }
}

describe('DepotSwitcher in the shell', () => {
  let mock: HttpTestingController;
  const answers: boolean[] = [];
  const open = vi.fn(() => ({ afterClosed: () => of(answers.shift()) }));

  beforeEach(() => {
    open.mockClear();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([
          {
            path: '',
            canActivateChild: [depotLinkGuard],
            children: [
              { path: 'fleet', component: BusesPage },
              { path: 'tonight', component: TonightPage },
              { path: 'probe', component: EditProbe },
            ],
          },
        ]),
        provideHttpClient(),
        provideHttpClientTesting(),
        provideFakeLive(),
        { provide: MatDialog, useValue: { open } },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
  });
  afterEach(() => mock.verify());

  async function render(roles: Role[], depots = [depot(), southDepot()], chosenDepotId: string | null = null) {
    const auth = TestBed.inject(AuthStore);
    const signingIn = auth.signIn('ada@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
    await signingIn;
    const fixture = TestBed.createComponent(Shell);
    mock.expectOne('/api/depots').flush({ depots, chosenDepotId });
    await fixture.whenStable();
    fixture.detectChanges();
    return { fixture, el: fixture.nativeElement as HTMLElement };
  }

  const trigger = (el: HTMLElement) => el.querySelector<HTMLButtonElement>('button[data-testid="depot-switcher"]');

  async function pick(fixture: { detectChanges(): void; whenStable(): Promise<unknown> }, name: string) {
    const el = (fixture as unknown as { nativeElement: HTMLElement }).nativeElement;
    trigger(el)!.click();
    fixture.detectChanges();
    await fixture.whenStable();
    const item = [...document.querySelectorAll<HTMLButtonElement>('[role="menuitemradio"]')].find((b) =>
      b.textContent?.includes(name),
    );
    expect(item).toBeDefined();
    item!.click();
    await settle();
    fixture.detectChanges();
  }

  it('shows the chosen depot in a labelled control, the others in its menu', async () => {
    const { fixture, el } = await render(['supervisor'], [depot(), southDepot()], SOUTH_ID);
    const button = trigger(el)!;
    expect(button.getAttribute('aria-label')).toBe('Depot: Riverside Depot. Switch depot');
    expect(button.textContent).toContain('Riverside Depot');
    button.click();
    fixture.detectChanges();
    await fixture.whenStable();
    const items = [...document.querySelectorAll('[role="menuitemradio"]')];
    expect(
      items.map((i) => [
        i.textContent?.replace(/radio_button_(un)?checked/, '').trim(),
        i.getAttribute('aria-checked'),
      ]),
    ).toEqual([
      ['North Depot', 'false'],
      ['Riverside Depot', 'true'],
    ]);
  });

  it('with one depot shows its name and no control', async () => {
    const { el } = await render(['yard'], [depot()], null);
    expect(trigger(el)).toBeNull();
    expect(el.querySelector('header')!.textContent).toContain('North Depot');
    expect(el.querySelector('header [aria-haspopup]')?.getAttribute('aria-label')).not.toMatch(/depot/i);
  });

  it('reloads the open section for the depot chosen and has the API remember it', async () => {
    const { fixture, el } = await render(['supervisor']);
    await TestBed.inject(Router).navigateByUrl('/fleet');
    await settle();
    mock.expectOne(`/api/depots/${NORTH_ID}/buses`).flush({ buses: [bus({ number: '201' })] });
    await settle();
    fixture.detectChanges();
    expect(el.querySelector('main')!.textContent).toContain('201');

    await pick(fixture, 'Riverside Depot');
    const put = mock.expectOne('/api/me/depot');
    expect(put.request.method).toBe('PUT');
    expect(put.request.body).toEqual({ depotId: SOUTH_ID });
    put.flush({ chosenDepotId: SOUTH_ID });
    await settle();
    fixture.detectChanges();
    // The page starts afresh: nothing of North Depot's fleet shows under the new name meanwhile.
    expect(el.querySelector('main')!.textContent).not.toContain('201');
    mock.expectOne(`/api/depots/${SOUTH_ID}/buses`).flush({ buses: [bus({ number: '7001' })] });
    await settle();
    fixture.detectChanges();
    expect(el.querySelector('header')!.textContent).toContain('Riverside Depot');
    expect(el.querySelector('main')!.textContent).toContain('7001');
    expect(el.querySelector('main')!.textContent).not.toContain('201');
  });

  it("re-opens Tonight's live stream and requests for the depot chosen, and closes the one before", async () => {
    const { fixture } = await render(['supervisor']);
    const live = TestBed.inject(FakeLiveTransport);
    const unavailable = { status: 503, statusText: 'Unavailable' };
    // Answers every request (each with a failure), and the ones they lead to, until none is left.
    const answerAll = async () => {
      const urls: string[] = [];
      for (let round = 0; round < 5; round++) {
        await settle();
        const pending = mock.match(() => true);
        if (pending.length === 0) break;
        for (const req of pending) {
          urls.push(req.request.url);
          req.flush({ error: { code: 'unavailable', message: 'Away.' } }, unavailable);
        }
      }
      return urls;
    };
    await TestBed.inject(Router).navigateByUrl('/tonight');
    await settle();
    fixture.detectChanges();
    // Tonight asks for the depot list's counts again (the list, of every depot) and for its depot's own.
    const ofDepot = (urls: string[]) => urls.filter((u) => u !== '/api/depots');
    const before = await answerAll();
    expect(ofDepot(before).length).toBeGreaterThan(0);
    expect(ofDepot(before).every((u) => u.includes(NORTH_ID))).toBe(true);
    expect(live.streams.map((s) => [s.depotId, s.closed])).toEqual([[NORTH_ID, false]]);

    await pick(fixture, 'Riverside Depot');
    mock.expectOne('/api/me/depot').flush({ chosenDepotId: SOUTH_ID });
    await settle();
    fixture.detectChanges();
    await new Promise((r) => setTimeout(r, 0));
    await settle();
    const after = await answerAll();
    expect(ofDepot(after).length).toBeGreaterThan(0);
    expect(ofDepot(after).every((u) => u.includes(SOUTH_ID))).toBe(true);
    expect(live.streams.map((s) => [s.depotId, s.closed])).toEqual([
      [NORTH_ID, true],
      [SOUTH_ID, false],
    ]);
  });

  it('asks before a switch throws away edits, and stays when told to', async () => {
    const { fixture } = await render(['supervisor']);
    await TestBed.inject(Router).navigateByUrl('/probe');
    await settle();
    fixture.detectChanges();
    const probe = fixture.debugElement.query((d) => d.componentInstance instanceof EditProbe)
      .componentInstance as EditProbe;
    probe.form.setValue('typed');
    probe.form.markAsDirty();

    answers.push(false);
    await pick(fixture, 'Riverside Depot');
    expect(open).toHaveBeenCalledTimes(1);
    const data = (open.mock.calls[0] as unknown as [unknown, { data: { message: string } }])[1].data;
    expect(data.message).toBe('The changes to the probe are not saved. Switching to Riverside Depot throws them away.');
    mock.expectNone('/api/me/depot');
    expect(TestBed.inject(DepotListStore).current()?.id).toBe(NORTH_ID);

    answers.push(true);
    await pick(fixture, 'Riverside Depot');
    mock.expectOne('/api/me/depot').flush({ chosenDepotId: SOUTH_ID });
    await settle();
    expect(TestBed.inject(DepotListStore).current()?.id).toBe(SOUTH_ID);
  });

  it('opens a link with ?depot= on that depot', async () => {
    const { fixture } = await render(['supervisor']);
    const router = TestBed.inject(Router);
    await router.navigateByUrl(`/fleet?depot=${SOUTH_ID}`);
    await settle();
    mock.expectOne('/api/me/depot').flush({ chosenDepotId: SOUTH_ID });
    await settle();
    await fixture.whenStable();
    expect(router.url).toBe('/fleet');
    expect(TestBed.inject(DepotListStore).current()?.id).toBe(SOUTH_ID);
    // The page is made once, for the depot of the link.
    mock.expectOne(`/api/depots/${SOUTH_ID}/buses`).flush({ buses: [] });
  });
});
