import { createHash } from 'node:crypto';

/**
 * A JSON answer serialized once, with its entity tag, for answers sent many times over (cached reads):
 * `endpoint()` sends the text as it is, and a client that already holds it (If-None-Match) gets 304.
 */
export class PreparedJson {
  readonly etag: string;
  constructor(readonly text: string) {
    // The same form as Express's own weak tags: length and SHA-1 of the body.
    this.etag = `W/"${Buffer.byteLength(text).toString(16)}-${createHash('sha1').update(text).digest('base64').slice(0, 27)}"`;
  }
}

export const prepareJson = (value: unknown) => new PreparedJson(JSON.stringify(value));
