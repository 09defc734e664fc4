import express from 'express';
import request from 'supertest';
import { z } from 'zod';
import { Api } from '../src/http';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { startTestApp, type TestApp } from './helpers';

// Every route documents its success answer: a JSON schema (from its response schema in
// shared/schemas), a file type, or 204 with no body. Under NODE_ENV=test the route layer checks
// every JSON answer the API tests receive against that schema (server/src/http.ts, answerChecked).

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.stop());

interface Operation {
  responses: Record<string, { content?: Record<string, { schema?: unknown }> }>;
}

it('documents the success answer of every route', async () => {
  const doc = (await request(t.app).get('/api/openapi.json').expect(200)).body as { paths: Record<string, Record<string, Operation>> };
  const lacking: string[] = [];
  const described: string[] = [];
  for (const [path, ops] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(ops)) {
      const route = `${method.toUpperCase()} ${path.replace(/\{([A-Za-z_]+)\}/g, ':$1')}`;
      const ok = Object.entries(op.responses).filter(([status]) => Number(status) < 300);
      expect(ok.length, `${route} documents no success answer`).toBeGreaterThan(0);
      const full = ok.every(([status, r]) => (status === '204' ? !r.content : Object.values(r.content ?? {}).some((c) => c.schema)));
      (full ? described : lacking).push(route);
    }
  }
  expect(lacking.sort(), 'routes whose success answer has no schema').toEqual([]);
  expect(described.length).toBeGreaterThan(0);
});

it('turns an answer outside its schema into a 500 naming the field, under NODE_ENV=test', async () => {
  const api = new Api(t.deps);
  const answer = z.object({ count: z.number() });
  let sent: unknown = { count: 3 };
  api.route(
    { method: 'get', path: '/api/probe', summary: 'probe', tag: 'Test', access: { kind: 'public' }, response: answer },
    () => sent as z.input<typeof answer>,
  );
  const app = express().use('/api', api.router);
  expect((await request(app).get('/api/probe')).body).toEqual({ count: 3 });
  sent = { count: 'three' };
  const r = await request(app).get('/api/probe');
  expect(r.status).toBe(500);
  expect(r.body.error.code).toBe('answer_mismatch');
  expect(Object.keys(r.body.error.fields)).toEqual(['count']);
});
