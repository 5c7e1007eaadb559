/** The part of autocannon 9 the benchmark uses (the package ships no types). */
declare module 'autocannon' {
  import type { EventEmitter } from 'node:events';

  interface Request {
    method?: string;
    path?: string;
    headers?: Record<string, string>;
  }
  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    amount?: number;
    headers?: Record<string, string>;
    requests?: Request[];
  }
  interface Result {
    requests: { total: number; average: number };
    non2xx: number;
    errors: number;
    timeouts: number;
  }
  interface Instance extends EventEmitter, PromiseLike<Result> {
    stop(): void;
  }
  function autocannon(opts: Options): Instance;
  export default autocannon;
}
