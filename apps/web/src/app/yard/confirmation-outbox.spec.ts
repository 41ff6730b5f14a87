import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { AuthStore } from '../auth/auth-store';
import { settle } from '../testing/fixtures';
import { ConfirmationOutbox, OUTBOX_STORAGE_KEY, RETRY_DELAYS_MS, type OutboxOutcome } from './confirmation-outbox';
import { PLAN_ID } from './yard-fixtures';

describe('ConfirmationOutbox', () => {
  let outbox: ConfirmationOutbox;
  let mock: HttpTestingController;
  const user = signal<{ id: string } | null>({ id: 'user-1' });
  const KEY = 'connect|201|C1|2026-12-02T03:00:00.000Z';

  function setUp(): void {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting(), { provide: AuthStore, useValue: { user } }],
    });
    mock = TestBed.inject(HttpTestingController);
    outbox = TestBed.inject(ConfirmationOutbox);
  }

  const stored = () => JSON.parse(localStorage.getItem(OUTBOX_STORAGE_KEY) ?? '[]') as unknown[];

  beforeEach(() => {
    localStorage.clear();
    user.set({ id: 'user-1' });
    vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout'] });
  });

  afterEach(() => {
    mock.verify();
    vi.useRealTimers();
  });

  it('keeps a confirmation through a network error, retries it and stops after the server saves it', async () => {
    setUp();
    const outcomes: OutboxOutcome[] = [];
    outbox.onSettled((o) => outcomes.push(o));

    outbox.confirm(PLAN_ID, KEY);
    expect(stored()).toHaveLength(1);
    const first = mock.expectOne('/api/yard/confirmations');
    expect(first.request.body).toEqual({ planId: PLAN_ID, stepKey: KEY });
    first.error(new ProgressEvent('error'), { status: 0 });
    await settle();

    expect(outbox.stateOf(KEY)).toMatchObject({ state: 'saving', retrying: true });
    expect(stored()).toHaveLength(1);
    mock.expectNone('/api/yard/confirmations');

    await vi.advanceTimersByTimeAsync(RETRY_DELAYS_MS[0]!);
    const second = mock.expectOne('/api/yard/confirmations');
    expect(second.request.body).toEqual({ planId: PLAN_ID, stepKey: KEY });
    second.flush({ stepKey: KEY, confirmedAt: '2026-12-02T03:01:00.000Z', confirmedBy: 'Kofi Brandt' });
    await settle();

    expect(outbox.stateOf(KEY)).toEqual({
      state: 'saved',
      confirmedAt: '2026-12-02T03:01:00.000Z',
      confirmedBy: 'Kofi Brandt',
    });
    expect(stored()).toEqual([]);
    expect(outcomes).toHaveLength(1);
    await vi.advanceTimersByTimeAsync(60_000);
    mock.expectNone('/api/yard/confirmations');
  });

  it('sends what a closed page left in the outbox, for the person who confirmed it only', async () => {
    localStorage.setItem(
      OUTBOX_STORAGE_KEY,
      JSON.stringify([
        { planId: PLAN_ID, stepKey: KEY, userId: 'user-1', queuedAt: '2026-12-02T03:00:30.000Z' },
        { planId: PLAN_ID, stepKey: 'other', userId: 'user-2', queuedAt: '2026-12-02T03:00:30.000Z' },
      ]),
    );
    setUp();
    expect(outbox.stateOf(KEY)).toMatchObject({ state: 'saving' });
    outbox.flush();
    mock
      .expectOne('/api/yard/confirmations')
      .flush({ stepKey: KEY, confirmedAt: '2026-12-02T03:01:00.000Z', confirmedBy: null });
    await settle();
    expect(stored()).toEqual([expect.objectContaining({ userId: 'user-2' })]);
  });

  it('drops a confirmation the server refuses for good (a superseded plan) and says why', async () => {
    setUp();
    const outcomes: OutboxOutcome[] = [];
    outbox.onSettled((o) => outcomes.push(o));
    outbox.confirm(PLAN_ID, KEY);
    mock.expectOne('/api/yard/confirmations').flush(
      {
        error: { code: 'conflict', message: 'This plan was replaced by version 2: reload to see the current steps' },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();
    expect(outbox.stateOf(KEY)).toEqual({
      state: 'failed',
      message: 'This plan was replaced by version 2: reload to see the current steps',
    });
    expect(outcomes[0]).toEqual({
      stepKey: KEY,
      failed: { status: 409, message: 'This plan was replaced by version 2: reload to see the current steps' },
    });
    expect(stored()).toEqual([]);
    await vi.advanceTimersByTimeAsync(60_000);
    mock.expectNone('/api/yard/confirmations');
  });

  it('retries a server error too', async () => {
    setUp();
    outbox.confirm(PLAN_ID, KEY);
    mock.expectOne('/api/yard/confirmations').flush({}, { status: 503, statusText: 'Unavailable' });
    await settle();
    expect(outbox.stateOf(KEY)).toMatchObject({ state: 'saving', retrying: true });
    await vi.advanceTimersByTimeAsync(RETRY_DELAYS_MS[0]!);
    mock
      .expectOne('/api/yard/confirmations')
      .flush({ stepKey: KEY, confirmedAt: '2026-12-02T03:01:00.000Z', confirmedBy: null });
    await settle();
    expect(outbox.stateOf(KEY)?.state).toBe('saved');
  });
});
