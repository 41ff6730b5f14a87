import { randomUUID } from 'node:crypto';
import { Writable } from 'node:stream';
import express from 'express';
import supertest from 'supertest';
import { describe, expect, it } from 'vitest';
import { loadConfig, wantsDemoSeed } from '../config';
import { chargers } from '../db/schema';
import { isDatabaseUnavailable } from '../db/unavailable';
import { createLogger } from '../logging';
import { createTestApp } from '../testing/test-app';
import { errorHandler } from './error-handler';

const app = createTestApp();

/** A logger whose lines land in an array. */
function capturedLogger() {
  const lines: string[] = [];
  const stream = new Writable({
    write(chunk, _enc, done) {
      lines.push(String(chunk));
      done();
    },
  });
  return { log: createLogger({ level: 'info' }, stream), lines };
}

describe('failed-query logs never carry the values the query was run with', () => {
  it('a failed INSERT with a charger password hash: 500 for the caller, the query but not the hash in the log', async () => {
    const secret = `$2a$10$${randomUUID().replace(/-/g, '')}SECRETHASH`;
    const { log, lines } = capturedLogger();
    const tiny = express();
    tiny.use((req, _res, next) => {
      (req as unknown as { log: typeof log }).log = log;
      next();
    });
    tiny.get('/boom', async () => {
      // No such depot: the foreign key refuses it, and drizzle's error repeats every parameter.
      await app.db.insert(chargers).values({
        organisationId: randomUUID(),
        depotId: randomUUID(),
        label: 'X',
        maxKw: 60,
        connector: 'CCS1',
        ocppPasswordHash: secret,
      });
    });
    tiny.use(errorHandler);
    const res = await supertest(tiny).get('/boom').expect(500);
    expect(res.body.error.code).toBe('internal');
    expect(JSON.stringify(res.body)).not.toContain(secret);
    const text = lines.join('');
    expect(text).toContain('Failed query: insert into \\"chargers\\"');
    expect(text).toContain('23503');
    // The database's own detail names the key's value: gone too.
    expect(text).toContain('Key (organisation_id)=([redacted])');
    expect(text).not.toContain(secret);
    expect(text).not.toContain('SECRETHASH');
  });

  it('the logger scrubs any error passed as err, and redacts password fields', async () => {
    const secret = `hash-${randomUUID()}`;
    const err = await app.db
      .insert(chargers)
      .values({
        organisationId: randomUUID(),
        depotId: randomUUID(),
        label: 'Y',
        maxKw: 60,
        connector: 'CCS1',
        ocppPasswordHash: secret,
      })
      .then(
        () => null,
        (e: unknown) => e,
      );
    expect(String((err as Error).message)).toContain(secret);
    const { log, lines } = capturedLogger();
    log.error({ err, body: { password: secret } }, 'failed');
    expect(lines.join('')).not.toContain(secret);
  });
});

describe('Cache-Control', () => {
  it('every /api answer says no-store: public, signed-in, errors and sign-in itself', async () => {
    for (const res of [
      await app.request().get('/api/health'),
      await app
        .request()
        .post('/api/auth/login')
        .send({ email: 'nobody@test.nightyard.example', password: 'not-the-password' }),
      await app.request().get('/api/auth/me'),
      await app.request().get('/api/no-such-route'),
    ]) {
      expect(res.headers['cache-control']).toBe('no-store');
    }
  });
});

describe('database-away errors are told apart from query errors', () => {
  it('connection refused, terminated, admin shutdown and class 08 are "unavailable"; a constraint violation is not', () => {
    expect(
      isDatabaseUnavailable(Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:5432'), { code: 'ECONNREFUSED' })),
    ).toBe(true);
    expect(isDatabaseUnavailable(new Error('Connection terminated unexpectedly'))).toBe(true);
    const wrapped = Object.assign(new Error('Failed query: select 1\nparams: '), {
      query: 'select 1',
      cause: Object.assign(new Error('terminating connection due to administrator command'), { code: '57P01' }),
    });
    expect(isDatabaseUnavailable(wrapped)).toBe(true);
    expect(isDatabaseUnavailable(Object.assign(new Error('x'), { code: '08006' }))).toBe(true);
    expect(isDatabaseUnavailable(new AggregateError([Object.assign(new Error('a'), { code: 'ECONNREFUSED' })]))).toBe(
      true,
    );
    expect(
      isDatabaseUnavailable(
        Object.assign(new Error('Failed query'), { cause: Object.assign(new Error('dup'), { code: '23505' }) }),
      ),
    ).toBe(false);
    expect(isDatabaseUnavailable(new Error('Something else'))).toBe(false);
  });
});

describe('demo seed by environment', () => {
  const secret = 'a-long-random-production-secret-0123456789';
  it('development seeds an empty database; production never does unless SEED_DEMO=always', () => {
    expect(wantsDemoSeed(loadConfig({ NODE_ENV: 'development' }))).toBe(true);
    expect(wantsDemoSeed(loadConfig({}))).toBe(true);
    expect(wantsDemoSeed(loadConfig({ NODE_ENV: 'production', JWT_SECRET: secret }))).toBe(false);
    expect(loadConfig({ NODE_ENV: 'production', JWT_SECRET: secret }).SEED_DEMO).toBe('never');
    expect(wantsDemoSeed(loadConfig({ NODE_ENV: 'production', JWT_SECRET: secret, SEED_DEMO: 'always' }))).toBe(true);
    expect(wantsDemoSeed(loadConfig({ NODE_ENV: 'development', SEED_DEMO: 'never' }))).toBe(false);
    expect(() => loadConfig({ NODE_ENV: 'production', JWT_SECRET: secret, SEED_DEMO: 'if-empty' })).toThrow(
      /SEED_DEMO=always/,
    );
  });
});
