import { HttpClient, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { firstValueFrom } from 'rxjs';
import { Clock } from './clock';
import { SERVER_TIME_HEADER, serverTimeInterceptor } from './server-time-interceptor';

describe('Clock', () => {
  let clock: Clock;
  let http: HttpClient;
  let mock: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(withInterceptors([serverTimeInterceptor])), provideHttpClientTesting()],
    });
    clock = TestBed.inject(Clock);
    http = TestBed.inject(HttpClient);
    mock = TestBed.inject(HttpTestingController);
  });
  afterEach(() => mock.verify());

  /** Answers one GET with the server's time in the header. */
  async function answer(url: string, serverMs: number | string, status = 200): Promise<void> {
    const done = firstValueFrom(http.get(url)).catch(() => undefined);
    const headers = { [SERVER_TIME_HEADER]: String(serverMs) };
    mock
      .expectOne(url)
      .flush(status === 200 ? {} : { error: { code: 'x', message: 'no' } }, { status, statusText: 'S', headers });
    await done;
  }

  it('follows the server when the device clock is days off', async () => {
    // Whatever this machine's date: the server says it is 01:30 at a Chicago depot on 2 Dec 2026.
    const server = Date.parse('2026-12-02T07:30:00Z');
    await answer('/api/depots', server);
    expect(Math.abs(clock.now().getTime() - server)).toBeLessThan(2_000);
    expect(Math.abs(clock.tick() - server)).toBeLessThan(2_000);
    // eslint-disable-next-line no-restricted-syntax -- the offset is measured against this device's clock
    expect(Math.abs(clock.offsetMs() - (server - Date.now()))).toBeLessThan(2_000);
    expect(clock.todayAt('America/Chicago')).toBe('2026-12-02');
    expect(clock.todayAt('Asia/Tokyo')).toBe('2026-12-02');
    expect(clock.todayAt('Pacific/Honolulu')).toBe('2026-12-01');
  });

  it('moves when the server moves, and also from error answers', async () => {
    const first = Date.parse('2026-06-01T12:00:00Z');
    await answer('/api/depots', first);
    const later = Date.parse('2027-01-15T03:00:00Z');
    await answer('/api/plans/x', later, 404);
    expect(Math.abs(clock.nowMs() - later)).toBeLessThan(2_000);
  });

  it('keeps the device time (offset 0) until an answer says otherwise, and ignores bad headers', async () => {
    expect(clock.offsetMs()).toBe(0);
    await answer('/api/depots', 'not-a-time');
    expect(clock.offsetMs()).toBe(0);
    const done = firstValueFrom(http.get('/elsewhere'));
    mock
      .expectOne('/elsewhere')
      .flush({}, { headers: { [SERVER_TIME_HEADER]: String(Date.parse('2030-01-01T00:00:00Z')) } });
    await done;
    expect(clock.offsetMs()).toBe(0);
  });

  it('counts half the round trip, and leaves jitter under a second alone', () => {
    const server = Date.parse('2026-12-02T07:30:00Z');
    clock.setServerTime(server, 4_000);
    // The server stamped the answer halfway: it reads 2 s more by the time the answer is here.
    expect(Math.abs(clock.nowMs() - (server + 2_000))).toBeLessThan(500);
    const offset = clock.offsetMs();
    clock.setServerTime(clock.nowMs() + 300);
    expect(clock.offsetMs()).toBe(offset);
    clock.setServerTime(clock.nowMs() + 5_000);
    expect(Math.abs(clock.offsetMs() - (offset + 5_000))).toBeLessThan(100);
  });
});
