const loneSurrogate = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** Text PostgreSQL cannot store: U+0000 (text) and unpaired surrogates (jsonb), anywhere in a value. */
export function badText(v: unknown, depth = 0): boolean {
  if (typeof v === 'string') return v.includes('\u0000') || loneSurrogate.test(v);
  if (depth > 32 || !v || typeof v !== 'object') return false;
  return Object.entries(v).some(([k, x]) => badText(k) || badText(x, depth + 1));
}
