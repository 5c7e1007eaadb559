import { Router, type Request, type Response } from 'express';
import type { LiveEvent } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { unauthorized } from '../../lib/errors';
import { openLiveStream } from './events.service';

/** A keep-alive comment this often keeps proxies and load balancers from closing an idle stream. */
export const KEEP_ALIVE_MS = 25_000;

/** `Last-Event-ID` as a row id, or undefined when absent or not a whole number. */
function lastEventId(req: Request): number | undefined {
  const raw = req.get('Last-Event-ID');
  if (!raw || !/^\d{1,15}$/.test(raw.trim())) return undefined;
  return Number(raw.trim());
}

/**
 * `/api/events`: Server-Sent Events for the signed-in person's screens (`@coilpath/contract` events.ts says
 * who hears what). Each event: `id:` (send it back as `Last-Event-ID`), `event:` its kind, `data:` JSON.
 */
export function eventsRoutes(ctx: AppContext): Router {
  const r = Router();
  const keepAliveMs = ctx.config.liveKeepAliveMs ?? KEEP_ALIVE_MS;
  r.get('/', async (req: Request, res: Response) => {
    const user = req.user;
    if (!user) throw unauthorized();
    res.status(200);
    // no-transform: the compression middleware leaves the stream alone (it would hold events back).
    res.setHeader('Content-Type', 'text/event-stream; charset=utf-8');
    res.setHeader('Cache-Control', 'no-store, no-transform');
    res.setHeader('X-Accel-Buffering', 'no');
    res.flushHeaders();
    req.socket.setNoDelay(true);
    let open = true;
    const write = (text: string) => {
      if (open) res.write(text);
    };
    // A dropped stream is reconnected by the browser after `retry` milliseconds.
    write('retry: 2000\n\n');
    let close = () => undefined as void;
    const end = () => {
      if (!open) return;
      open = false;
      clearInterval(keepAlive);
      close();
      res.end();
    };
    const keepAlive = setInterval(() => write(': keep-alive\n\n'), keepAliveMs);
    req.on('close', end);
    try {
      close = await openLiveStream(ctx, user, req.session?.id ?? null, lastEventId(req), {
        send: (e: LiveEvent) => write(`id: ${e.id}\nevent: ${e.kind}\ndata: ${JSON.stringify(e)}\n\n`),
        mark: (id) => write(`id: ${id}\n\n`),
        drop: end,
      });
      if (!open) close();
      // Listening (and what was missed sent): from here on nothing is lost.
      write(': connected\n\n');
    } catch (err) {
      req.log.error({ err }, 'the live events could not be opened');
      end();
    }
  });
  return r;
}
