// A stand-in for Keepwell's API inside the browser (Playwright routing), serving the invented
// team of ../fixtures.ts, so the built client can be looked at without a server.

import type { BrowserContext, Route } from 'playwright-core';
import type { User } from '../../../shared/api/auth';
import { adminUsers, blocks, outbox, users } from '../fixtures';

const DEMO_PASSWORD = 'demo passphrase';

function reply(route: Route, status: number, body?: unknown) {
  return route.fulfill({ status, contentType: 'application/json', body: body === undefined ? '' : JSON.stringify(body) });
}

function fail(route: Route, status: number, code: string, message: string) {
  return reply(route, status, { error: { code, message } });
}

export interface MockApiOptions {
  /** Signed in from the start as this user, or signed out. */
  user: User | null;
  /** Answer `GET /api/blocks` with no blocks (to look at empty states). */
  noBlocks?: boolean;
}

export async function mockApi(context: BrowserContext, { user, noBlocks = false }: MockApiOptions) {
  let session: User | null = user;
  const everyone = Object.values(users);

  await context.route('**/api/**', async (route) => {
    const request = route.request();
    const url = new URL(request.url());
    const method = request.method();
    const key = `${method} ${url.pathname}`;
    const body = request.postDataJSON?.() as Record<string, unknown> | null;

    if (key === 'POST /api/auth/login') {
      const found = everyone.find((u) => u.email === body?.email);
      if (!found || body?.password !== DEMO_PASSWORD) return fail(route, 401, 'invalid-credentials', 'E-mail or password is wrong.');
      session = found;
      return reply(route, 200, { user: found });
    }
    if (key === 'GET /api/auth/me') return session ? reply(route, 200, { user: session }) : fail(route, 401, 'unauthenticated', 'Sign in first.');
    if (key === 'POST /api/auth/logout') {
      session = null;
      return reply(route, 204);
    }
    if (!session) return fail(route, 401, 'unauthenticated', 'Sign in first.');

    if (key === 'GET /api/blocks') return reply(route, 200, { items: noBlocks ? [] : blocks });
    const block = /^\/api\/blocks\/([^/]+)$/.exec(url.pathname);
    if (method === 'GET' && block) {
      const found = blocks.find((b) => b.id === block[1]);
      return found ? reply(route, 200, found) : fail(route, 404, 'not-found', 'No such block.');
    }
    if (key === 'GET /api/admin/users') return reply(route, 200, { items: adminUsers });
    if (key === 'GET /api/admin/outbox') {
      const items = outbox.map(({ text: _t, html: _h, ...summary }) => summary);
      return reply(route, 200, { items, total: items.length, page: 1, pageSize: 25 });
    }
    const message = /^\/api\/admin\/outbox\/([^/]+)$/.exec(url.pathname);
    if (method === 'GET' && message) {
      const found = outbox.find((m) => m.id === message[1]);
      return found ? reply(route, 200, found) : fail(route, 404, 'not-found', 'No such message.');
    }
    return fail(route, 404, 'not-found', `No route ${key} in the mock API.`);
  });
}

export { DEMO_PASSWORD };
