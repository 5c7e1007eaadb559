import express, { Router } from 'express';
import { describe, expect, it } from 'vitest';
import { listRoutes } from './list-routes';

describe('listRoutes', () => {
  it('finds routes in nested routers with their mount paths, and nothing else', () => {
    const app = express();
    const guard: express.RequestHandler = (_req, _res, next) => next();
    const inner = Router();
    inner.get('/', (_req, res) => res.end());
    inner.post('/', (_req, res) => res.end());
    inner.patch('/:id', (_req, res) => res.end());
    inner
      .route('/:id/notes')
      .get((_req, res) => res.end())
      .delete((_req, res) => res.end());
    const deeper = Router();
    deeper.get('/:index', (_req, res) => res.end());
    inner.use('/:id/files', deeper);
    const api = Router();
    api.get('/health', (_req, res) => res.end());
    api.use('/things', guard, inner);
    api.use(guard);
    app.use('/api', express.json());
    app.use('/api', api);
    app.use('/api', (_req, _res, next) => next());
    app.get('/{*splat}', (_req, res) => res.end());

    expect(listRoutes(app)).toEqual([
      { method: 'GET', path: '/{*splat}' },
      { method: 'GET', path: '/api/health' },
      { method: 'GET', path: '/api/things' },
      { method: 'POST', path: '/api/things' },
      { method: 'PATCH', path: '/api/things/:id' },
      { method: 'GET', path: '/api/things/:id/files/:index' },
      { method: 'DELETE', path: '/api/things/:id/notes' },
      { method: 'GET', path: '/api/things/:id/notes' },
    ]);
  });

  it('lists a route mounted at the router root under the mount path without a trailing slash', () => {
    const app = express();
    const r = Router();
    r.get('/', (_req, res) => res.end());
    app.use('/api/branches/', r);
    expect(listRoutes(app)).toEqual([{ method: 'GET', path: '/api/branches' }]);
  });
});
