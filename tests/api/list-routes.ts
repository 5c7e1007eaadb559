/**
 * Lists the routes of an Express 5 app: walks `app.router.stack`, descending into mounted routers
 * (`app.use('/x', router)`, `router.use('/y', requireAuth, other)`), and joins the mount paths.
 */
import type { Express } from 'express';

export interface ListedRoute {
  method: string;
  path: string;
}

/** A route with the handlers it runs (middleware and the route's own), in order. */
export interface ListedRouteHandlers extends ListedRoute {
  handlers: unknown[];
}

interface Layer {
  rawPath?: unknown;
  method?: string;
  route?: { path: unknown; methods: Record<string, boolean>; stack?: Layer[] };
  handle?: { stack?: Layer[] };
}

function joinPath(prefix: string, part: unknown): string {
  if (typeof part !== 'string') {
    throw new Error(`listRoutes: only string paths are supported, found ${String(part)}`);
  }
  const joined = `${prefix}/${part}`.replace(/\/{2,}/g, '/');
  return joined.length > 1 ? joined.replace(/\/$/, '') : joined;
}

function walk(stack: Layer[], prefix: string, out: ListedRouteHandlers[]) {
  for (const layer of stack) {
    if (layer.route) {
      const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
      for (const p of paths) {
        for (const [method, on] of Object.entries(layer.route.methods)) {
          if (!on || method === '_all') continue;
          const handlers = (layer.route.stack ?? []).filter((l) => l.method === undefined || l.method === method).map((l) => l.handle);
          out.push({ method: method.toUpperCase(), path: joinPath(prefix, p), handlers });
        }
      }
    } else if (layer.handle?.stack) {
      const mounts = Array.isArray(layer.rawPath) ? layer.rawPath : [layer.rawPath ?? '/'];
      for (const m of mounts) walk(layer.handle.stack, joinPath(prefix, m), out);
    }
  }
}

/** Every method + path pattern the app answers, sorted, without duplicates (HEAD of GET routes left out). */
export function listRoutes(app: Express): ListedRoute[] {
  return listRouteHandlers(app).map(({ method, path }) => ({ method, path }));
}

/** As `listRoutes`, with each route's own handlers (the first route of a method + path wins, as in Express). */
export function listRouteHandlers(app: Express): ListedRouteHandlers[] {
  const router = (app as unknown as { router?: { stack: Layer[] } }).router;
  if (!router) throw new Error('listRoutes: not an Express 5 app (no app.router)');
  const out: ListedRouteHandlers[] = [];
  walk(router.stack, '', out);
  const seen = new Set<string>();
  return out
    .filter((r) => {
      const key = `${r.method} ${r.path}`;
      if (seen.has(key)) return false;
      seen.add(key);
      return true;
    })
    .sort((x, y) => x.path.localeCompare(y.path) || x.method.localeCompare(y.method));
}
