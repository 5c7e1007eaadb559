/**
 * "Now" for the web app. Normally the browser's clock; when the server runs at another instant
 * (`COILPATH_NOW`, for demos and browser journeys) its answers carry `X-Coilpath-Now`, and the app reckons
 * today, the current week and "due in …" by the server's clock instead, so screen and server agree.
 */
let offsetMs = 0;

/** The current instant as the app should see it. */
export function appNow(): Date {
  return new Date(Date.now() + offsetMs);
}

/** Milliseconds since the epoch, as `appNow()`. */
export function appNowMs(): number {
  return Date.now() + offsetMs;
}

/** Takes the server's clock from an answer's `X-Coilpath-Now` header (ignored when absent or unreadable). */
export function noteServerNow(header: string | null, browserMs: number = Date.now()): void {
  if (!header) return;
  const server = Date.parse(header);
  if (Number.isNaN(server)) return;
  offsetMs = server - browserMs;
}

/** An instant the browser's clock recorded (e.g. when an answer was fetched), as the app's clock sees it. */
export function appTimeOf(browserMs: number): Date {
  return new Date(browserMs + offsetMs);
}
