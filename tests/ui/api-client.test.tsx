// The fetch wrapper against the HTTP semantics it relies on (RFC 9110) and the one error shape
// of shared/api/common.ts.
import { afterEach, describe, expect, it, vi } from 'vitest';
import { api, ApiRequestError, setUnauthenticatedHandler } from '../../src/lib/api';
import { apiError, fakeApi, json } from './support';

afterEach(() => setUnauthenticatedHandler(null));

describe('api client', () => {
  it('turns the shared error body into an ApiRequestError with code and details', async () => {
    fakeApi({
      'POST /api/blocks': () => apiError(400, 'validation', 'The block is not valid.', [{ path: 'name', message: 'must start with a letter or digit' }]),
    });
    const error = await api.post('/api/blocks', { name: '_x' }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiRequestError);
    expect(error).toMatchObject({ status: 400, code: 'validation', message: 'The block is not valid.', details: [{ path: 'name', message: 'must start with a letter or digit' }] });
  });

  it('sends JSON with same-origin credentials', async () => {
    fakeApi({ 'POST /api/blocks': () => json(201, { id: 'x' }) });
    await api.post('/api/blocks', { name: 'lk_rf_64x32' });
    const [, init] = vi.mocked(fetch).mock.calls[0];
    expect(init).toMatchObject({ method: 'POST', credentials: 'same-origin', body: '{"name":"lk_rf_64x32"}' });
    expect((init!.headers as Record<string, string>)['Content-Type']).toBe('application/json');
  });

  it('gives a plain message for an answer that is not the shared shape (a proxy’s 502 page)', async () => {
    // RFC 9110 §15.6.3: 502 Bad Gateway comes from an intermediary, whose body is its own.
    fakeApi({ 'GET /api/blocks': () => new Response('<html>Bad gateway</html>', { status: 502, statusText: 'Bad Gateway' }) });
    await expect(api.get('/api/blocks')).rejects.toMatchObject({ status: 502, code: 'internal', message: 'The server answered 502 Bad Gateway.' });
  });

  it('reports an unreachable server as a network error, status 0', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => Promise.reject(new TypeError('Failed to fetch'))));
    await expect(api.get('/api/blocks')).rejects.toMatchObject({ status: 0, code: 'network' });
  });

  it('accepts answers without a body (204 No Content, 202 Accepted)', async () => {
    // RFC 9110 §15.3.5: a 204 response cannot contain content; §15.3.3: 202 may have none.
    fakeApi({ 'POST /api/auth/logout': () => json(204), 'POST /api/auth/password-reset': () => new Response(null, { status: 202 }) });
    await expect(api.post('/api/auth/logout')).resolves.toBeUndefined();
    await expect(api.post('/api/auth/password-reset', { email: 'a@b.example' })).resolves.toBeUndefined();
  });

  it('a 401 calls the sign-in redirect unless the call expects 401 as an answer', async () => {
    const onUnauthenticated = vi.fn();
    setUnauthenticatedHandler(onUnauthenticated);
    fakeApi({ 'GET /api/blocks': () => apiError(401, 'unauthenticated', 'Sign in first.'), 'POST /api/auth/login': () => apiError(401, 'invalid-credentials', 'No.') });
    await expect(api.get('/api/blocks')).rejects.toMatchObject({ status: 401 });
    expect(onUnauthenticated).toHaveBeenCalledTimes(1);
    await expect(api.post('/api/auth/login', {}, { redirectOnUnauthenticated: false })).rejects.toMatchObject({ code: 'invalid-credentials' });
    expect(onUnauthenticated).toHaveBeenCalledTimes(1);
  });

  it('by default a 401 leaves for the sign-in page, keeping the way back', async () => {
    const assign = vi.fn();
    vi.stubGlobal('location', { ...window.location, pathname: '/decks/d1', search: '?tab=history', assign });
    fakeApi({ 'GET /api/decks': () => apiError(401, 'unauthenticated', 'Sign in first.') });
    await expect(api.get('/api/decks')).rejects.toBeInstanceOf(ApiRequestError);
    expect(assign).toHaveBeenCalledWith(`/sign-in?next=${encodeURIComponent('/decks/d1?tab=history')}`);
  });
});
