import { execFile } from 'node:child_process';
import { describe, expect, it } from 'vitest';

const runGuarded = (mode: 'reject' | 'throw') =>
  new Promise<{ code: number | null; out: string }>((resolve) => {
    execFile(
      process.execPath,
      ['--import', 'tsx', 'apps/api/src/testing/guarded-process.ts', mode],
      { timeout: 20_000 },
      (err, stdout) => {
        resolve({ code: err ? ((err as { code?: number }).code ?? 1) : 0, out: stdout });
      },
    );
  });

describe('last-resort process handlers', () => {
  it('an unhandled rejection is logged as an error with its stack, and the process keeps serving', async () => {
    const { code, out } = await runGuarded('reject');
    expect(code).toBe(0);
    expect(out).toContain('still serving');
    const line = JSON.parse(out.split('\n').find((l) => l.includes('unhandled promise rejection'))!);
    expect(line).toMatchObject({
      level: 50,
      err: { message: 'nobody caught me', stack: expect.stringContaining('guarded-process') },
    });
  });

  it('an uncaught exception is logged as fatal and the process exits 1 (not hidden, not left half-broken)', async () => {
    const { code, out } = await runGuarded('throw');
    expect(code).toBe(1);
    expect(out).not.toContain('still serving');
    const line = JSON.parse(out.split('\n').find((l) => l.includes('uncaught exception'))!);
    expect(line).toMatchObject({ level: 60, err: { message: 'thrown into the event loop' } });
  });
});
