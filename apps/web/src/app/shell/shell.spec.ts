import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { SECTIONS, sectionsFor, type Role } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { depot, tokenResponse } from '../testing/fixtures';
import { Shell } from './shell';

describe('sectionsFor (from the contracts)', () => {
  it('gives yard staff the yard-side sections only', () => {
    expect(sectionsFor(['yard']).map((s) => s.label)).toEqual(['Tonight', 'Yard', 'Depot', 'Rates']);
  });

  it('gives an administrator every section', () => {
    expect(sectionsFor(['admin']).map((s) => s.label)).toEqual(SECTIONS.map((s) => s.label));
  });
});

describe('Shell', () => {
  let mock: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    mock = TestBed.inject(HttpTestingController);
  });

  afterEach(() => mock.verify());

  async function render(roles: Role[]) {
    const store = TestBed.inject(AuthStore);
    const signingIn = store.signIn('ada@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
    await signingIn;

    const fixture = TestBed.createComponent(Shell);
    mock.expectOne('/api/depots').flush({ depots: [depot()] });
    await fixture.whenStable();
    fixture.detectChanges();
    return fixture.nativeElement as HTMLElement;
  }

  function navLabels(el: HTMLElement): string[] {
    const nav = el.querySelector('nav[aria-label="Sections"]');
    expect(nav).not.toBeNull();
    return [...nav!.querySelectorAll('a')].map((a) => a.querySelector('[matListItemTitle]')?.textContent?.trim() ?? '');
  }

  it('lists only the sections a yard user may open, each linking to its path', async () => {
    const el = await render(['yard']);
    expect(navLabels(el)).toEqual(['Tonight', 'Yard', 'Depot', 'Rates']);
    const hrefs = [...el.querySelectorAll('nav[aria-label="Sections"] a')].map((a) => a.getAttribute('href'));
    expect(hrefs).toEqual(['/tonight', '/yard', '/depot', '/rates']);
    expect(el.textContent).not.toContain('People');
  });

  it('lists every section for an administrator, People included', async () => {
    const el = await render(['admin']);
    expect(navLabels(el)).toEqual([
      'Tonight',
      'Yard',
      'Plans',
      'Fleet',
      'Depot',
      'Rates',
      'Costs',
      'District',
      'People',
    ]);
  });

  it('gives a fleet supervisor no District', async () => {
    const el = await render(['supervisor']);
    expect(navLabels(el)).not.toContain('District');
  });

  it('lists finance sections for finance', async () => {
    const el = await render(['finance']);
    expect(navLabels(el)).toEqual(['Tonight', 'Plans', 'Fleet', 'Depot', 'Rates', 'Costs', 'District']);
  });

  it('shows the product name, the depot, the user and the labelled menus in a header', async () => {
    const el = await render(['supervisor']);
    const header = el.querySelector('header')!;
    expect(header.textContent).toContain('Nightyard');
    expect(header.textContent).toContain('North Depot');
    expect(header.textContent).toContain('Ada Okafor');
    expect(header.querySelector('button[aria-label="Account menu"]')).not.toBeNull();
    expect(header.querySelector('button[aria-label="Colour theme"]')).not.toBeNull();
    expect(el.querySelector('main#main')).not.toBeNull();
  });
});
