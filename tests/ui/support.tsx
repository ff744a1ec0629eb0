// Rendering the real client in jsdom against a fake API: the same routes, query client and
// 401 handling as the browser, with a memory router and a stubbed `fetch`.

import { render } from '@testing-library/react';
import { createMemoryRouter } from 'react-router';
import { vi } from 'vitest';
import type { User } from '../../shared/api/auth';
import { App, createClient } from '../../src/app/App';
import { routes } from '../../src/app/routes';

export type Handler = (request: { url: URL; method: string; body: unknown; params: Record<string, string> }) => Response | Promise<Response>;

export function json(status: number, body?: unknown): Response {
  if (body === undefined) return new Response(null, { status });
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
}

export function apiError(status: number, code: string, message: string, details?: { path: string; message: string }[]) {
  return json(status, { error: { code, message, ...(details ? { details } : {}) } });
}

export interface FakeApi {
  calls: { method: string; path: string; search: string; body: unknown }[];
  /** Calls to one route, e.g. `calledWith('POST /api/auth/login')`. */
  callsTo: (route: string) => { method: string; path: string; search: string; body: unknown }[];
}

/**
 * Replace `fetch` with a table of routes (`'GET /api/blocks/:id'`). Anything not in the
 * table answers 404 in the shared error shape, as the server does.
 */
export function fakeApi(table: Record<string, Handler>): FakeApi {
  const compiled = Object.entries(table).map(([route, handler]) => {
    const [method, pattern] = route.split(' ');
    const names: string[] = [];
    const regex = new RegExp(`^${pattern.replace(/:[a-zA-Z]+/g, (m) => (names.push(m.slice(1)), '([^/]+)'))}$`);
    return { method, regex, names, handler };
  });
  const api: FakeApi = {
    calls: [],
    callsTo: (route) => {
      const [method, path] = route.split(' ');
      return api.calls.filter((c) => c.method === method && c.path === path);
    },
  };
  vi.stubGlobal(
    'fetch',
    vi.fn(async (input: RequestInfo | URL, init?: RequestInit) => {
      const url = new URL(String(input), 'http://keepwell.test');
      const method = (init?.method ?? 'GET').toUpperCase();
      const body = typeof init?.body === 'string' ? JSON.parse(init.body) : undefined;
      api.calls.push({ method, path: url.pathname, search: url.search, body });
      for (const route of compiled) {
        const match = route.method === method ? route.regex.exec(url.pathname) : null;
        if (match) {
          const params = Object.fromEntries(route.names.map((n, i) => [n, decodeURIComponent(match[i + 1])]));
          return route.handler({ url, method, body, params });
        }
      }
      return apiError(404, 'not-found', `No route ${method} ${url.pathname}`);
    }),
  );
  return api;
}

/** Session routes for a signed-in `user` (or none), merged with the page's own routes. */
export function sessionRoutes(user: User | null): Record<string, Handler> {
  return {
    'GET /api/auth/me': () => (user ? json(200, { user }) : apiError(401, 'unauthenticated', 'Sign in first.')),
    'POST /api/auth/logout': () => json(204),
  };
}

export function renderApp(path: string) {
  const { queryClient, router } = createClient(routes, (r) => createMemoryRouter(r, { initialEntries: [path] }));
  const view = render(<App queryClient={queryClient} router={router} />);
  return { ...view, router, queryClient };
}
