/**
 * Routes other machines call, not browsers: they carry their own credential (a signature), never a
 * session cookie, and must stay exempt from any same-origin or cross-site-request check added for the
 * screens. A check that guards browser routes asks `isMachineRoute(method, path)` first.
 */
export const MACHINE_ROUTES = [
  /** A building controller posts an alarm, signed with its alarm source's secret (modules/alarm-sources). */
  { method: 'POST', path: '/api/ingest/alarms/:sourceId' },
] as const;

const patterns = MACHINE_ROUTES.map((r) => ({
  method: r.method,
  re: new RegExp(`^${r.path.replace(/:[A-Za-z]+/g, '[^/]+')}/?$`),
}));

/** Whether a request (its method and path, without the query) goes to a machine-to-machine route. */
export function isMachineRoute(method: string, path: string): boolean {
  const p = path.split('?')[0] ?? '';
  return patterns.some((r) => r.method === method.toUpperCase() && r.re.test(p));
}
