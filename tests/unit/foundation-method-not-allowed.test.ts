// The generic 405 (RFC 9110 §15.5.6: a 405 response must carry Allow with the methods the target supports):
// routes in nested routers, with parameters, across several routers on one path; unknown paths still fall to 404.
import { describe, expect, it } from 'vitest';
import express, { Router } from 'express';
import request from 'supertest';
import { methodNotAllowed } from '../../server/http/methods.js';
import { errorHandler, notFoundHandler } from '../../server/http/errors.js';

function buildApp(): express.Express {
  const app = express();
  const items = Router();
  items.get('/', (_req, res) => void res.json({ list: true }));
  items.post('/', (_req, res) => void res.status(201).json({}));
  items.put('/:id', (_req, res) => void res.json({}));
  const inner = Router();
  inner.delete('/:id/tags/:tag', (_req, res) => void res.status(204).end());
  items.use('/nested', inner);
  const more = Router();
  more.patch('/:id', (_req, res) => void res.json({}));
  app.use('/api/items', items);
  app.use('/api/items', more);
  // A middleware-only mount must not count as a route.
  app.use('/api/guarded', (_req, _res, next) => next());
  app.use('/api', methodNotAllowed(app));
  app.use('/api', notFoundHandler);
  app.use(errorHandler);
  return app;
}

describe('methodNotAllowed', () => {
  const app = buildApp();

  it('lists the methods of a plain path', async () => {
    const res = await request(app).delete('/api/items');
    expect(res.status).toBe(405);
    expect(res.headers.allow).toBe('GET, HEAD, POST');
    expect(res.body.error.code).toBe('method_not_allowed');
  });

  it('unites the methods of routes from two routers on one parameterised path', async () => {
    const res = await request(app).get('/api/items/42');
    expect(res.status).toBe(405);
    expect(res.headers.allow).toBe('PATCH, PUT');
  });

  it('descends into nested routers and their parameters', async () => {
    const res = await request(app).post('/api/items/nested/7/tags/blue');
    expect(res.status).toBe(405);
    expect(res.headers.allow).toBe('DELETE');
    expect((await request(app).delete('/api/items/nested/7/tags/blue')).status).toBe(204);
  });

  it('leaves unknown paths and middleware-only mounts to the 404', async () => {
    expect((await request(app).get('/api/nothing')).status).toBe(404);
    expect((await request(app).get('/api/guarded/x')).status).toBe(404);
    expect((await request(app).get('/api/items/42/extra')).status).toBe(404);
  });

  it('passes requests of an allowed method through', async () => {
    expect((await request(app).get('/api/items?x=1')).body).toEqual({ list: true });
    expect((await request(app).head('/api/items')).status).toBe(200);
  });
});
