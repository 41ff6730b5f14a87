/**
 * The browser tests' servers: Playwright worker `i` (0, 1, ...) has its own API on E2E_PORT + 2i
 * (serving the built app, on its own database) and its own charger simulator on E2E_PORT + 2i + 1.
 */
export const E2E_PORT = Number(process.env.E2E_PORT ?? 3100);

/** How many journeys run at once (each worker with its servers); E2E_WORKERS overrides. */
export const E2E_WORKERS = Math.max(1, Number(process.env.E2E_WORKERS ?? 2));

export function e2eServerPorts(worker: number): { api: number; simulator: number } {
  return { api: E2E_PORT + 2 * worker, simulator: E2E_PORT + 2 * worker + 1 };
}

/** Worker 0 uses E2E_DATABASE_URL itself; worker i > 0 the same name with `_${i + 1}` (nightyard_e2e_2). */
export function e2eDatabaseUrl(worker: number): string {
  const url = process.env.E2E_DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5434/nightyard_e2e';
  return worker === 0 ? url : `${url}_${worker + 1}`;
}
