import { describe, expect, it } from 'vitest';
import { createTestApp } from '../testing/test-app';

describe('health', () => {
  it('is ok when the database answers', async () => {
    const app = createTestApp();
    const res = await app.request().get('/api/health').expect(200);
    expect(res.body).toEqual({ status: 'ok' });
    expect(res.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
  });

  it('is 503 when the database does not answer', async () => {
    const app = createTestApp({ ping: () => Promise.reject(new Error('connection refused')) });
    const res = await app.request().get('/api/health').expect(503);
    expect(res.body.error.message).toBe('The database does not answer');
  });

  it("keeps a caller's request id", async () => {
    const app = createTestApp();
    const res = await app.request().get('/api/health').set('X-Request-Id', 'yard-tablet-7.42').expect(200);
    expect(res.headers['x-request-id']).toBe('yard-tablet-7.42');
  });
});

describe('OpenAPI document', () => {
  it('describes every route from the same schemas, with its roles', async () => {
    const app = createTestApp();
    const res = await app.request().get('/api/openapi.json').expect(200);
    expect(res.body.openapi).toBe('3.1.0');
    for (const r of app.routes) {
      const path = '/api' + r.path.replace(/:(\w+)/g, '{$1}');
      const op = res.body.paths[path]?.[r.method];
      expect(op, `${r.method} ${path}`).toBeDefined();
      if (r.access !== 'public') expect(op.description).toContain(r.access.join(', '));
    }
    const login = res.body.paths['/api/auth/login'].post;
    expect(login.requestBody.content['application/json'].schema.required).toEqual(['email', 'password']);
    // Replace-all writes document the Idempotency-Key header and its 422.
    const upload = res.body.paths['/api/depots/{depotId}/service-days/{date}/csv'].post;
    expect(upload.parameters).toContainEqual(expect.objectContaining({ in: 'header', name: 'Idempotency-Key' }));
    expect(Object.keys(upload.responses)).toEqual(expect.arrayContaining(['409', '422']));
  });
});
