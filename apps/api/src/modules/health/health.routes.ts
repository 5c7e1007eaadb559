import { Router } from 'express';
import type { AppContext } from '../../context';
import { health, publicConfig } from './health.service';

export function healthRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get('/health', async (_req, res) => {
    res.json(await health(ctx));
  });
  /** The demo password only on a demo start with the demo data loaded (`publicConfig`). */
  r.get('/config', async (_req, res) => {
    res.json(await publicConfig(ctx));
  });
  return r;
}
