/** In development and tests `api.get(…, { check })` parses the answer with its schema from `@coilpath/contract/responses`. */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { api, ApiError } from './api-client';

const answer = (body: unknown) =>
  vi.fn(async () => new Response(JSON.stringify(body), { status: 200, headers: { 'Content-Type': 'application/json' } }));

afterEach(() => {
  vi.unstubAllGlobals();
});

describe('api.get with a response check', () => {
  it('returns an answer its schema allows, as received', async () => {
    const body = { visitId: null, reason: null };
    vi.stubGlobal('fetch', answer(body));
    await expect(api.get('/api/visits/current', undefined, { check: 'currentVisitResultSchema' })).resolves.toEqual(body);
  });

  it('throws response_mismatch naming the path and the field when the answer breaks its schema', async () => {
    vi.stubGlobal('fetch', answer({ visitId: 42, reason: null }));
    const got = await api.get('/api/visits/current', undefined, { check: 'currentVisitResultSchema' }).catch((e: unknown) => e);
    expect(got).toBeInstanceOf(ApiError);
    expect((got as ApiError).code).toBe('response_mismatch');
    expect((got as ApiError).message).toContain('GET /api/visits/current');
    expect((got as ApiError).message).toContain('visitId');
  });

  it('does not check without a schema named', async () => {
    vi.stubGlobal('fetch', answer({ visitId: 42 }));
    await expect(api.get('/api/visits/current')).resolves.toEqual({ visitId: 42 });
  });
});
