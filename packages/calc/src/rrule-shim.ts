/**
 * `import { RRule } from 'rrule'` fails under Node ESM (rrule 2.8.1 ships CommonJS as its main
 * entry); reading the namespace works both there and in Vite/browser builds.
 */
import * as ns from 'rrule';

const m = (ns.RRule ? ns : Reflect.get(ns, 'default')) as typeof ns;
export const { RRule } = m;
