// A stand-in for Keepwell's API inside the browser (Playwright routing), serving the invented
// team of ../fixtures.ts, its finished run of ../runs-fixtures.ts and one rule deck, so the
// built client can be looked at without a server.

import type { BrowserContext, Route } from 'playwright-core';
import type { User } from '../../../shared/api/auth';
import type { DeckDetail, DeckVersion } from '../../../shared/api/decks';
import { defaultDeck } from '../../../rules/default-deck';
import { adminUsers, blocks, outbox, users } from '../fixtures';
import { EARLIER_RUN, RUN, runRoutes } from '../runs-fixtures';
import type { Handler } from '../support';

const DEMO_PASSWORD = 'demo passphrase';

function reply(route: Route, status: number, body?: unknown) {
  return route.fulfill({ status, contentType: 'application/json', body: body === undefined ? '' : JSON.stringify(body) });
}

function fail(route: Route, status: number, code: string, message: string) {
  return reply(route, status, { error: { code, message } });
}

// ---------------------------------------------------------------- one rule deck

const DECK_ID = 'd0000000-0000-4000-8000-0000000000d1';
const DECK_V1 = 'e0000000-0000-4000-8000-000000000001';
const owner = { id: users.methodology.id, name: users.methodology.name };

const DECK_VERSION: DeckVersion = {
  id: DECK_V1,
  deckId: DECK_ID,
  deckName: 'Larkspur core deck',
  version: 1,
  state: 'published',
  changeNote: 'First deck of the core datapath group.',
  lockVersion: 0,
  parentVersionId: null,
  parentVersion: null,
  createdBy: owner,
  createdAt: '2025-09-15T10:00:00Z',
  updatedAt: '2025-09-15T10:20:00Z',
  publishedBy: owner,
  publishedAt: '2025-09-15T10:20:00Z',
  isDeckDefault: true,
  content: { ...defaultDeck(), name: 'Larkspur core deck' },
};

const { content: _content, deckName: _deckName, ...versionSummary } = DECK_VERSION;

const DECK: DeckDetail = {
  id: DECK_ID,
  name: 'Larkspur core deck',
  description: 'The rules every block of the core datapath is reviewed against.',
  teamDefault: true,
  defaultVersion: { id: DECK_V1, version: 1 },
  latestPublished: { id: DECK_V1, version: 1 },
  draft: null,
  versionCount: 1,
  createdAt: '2025-09-15T10:00:00Z',
  updatedAt: '2025-09-15T10:20:00Z',
  versions: [versionSummary],
};

// ---------------------------------------------------------------- routes

export interface MockApiOptions {
  /** Signed in from the start as this user, or signed out. */
  user: User | null;
  /** Answer `GET /api/blocks` with no blocks (to look at empty states). */
  noBlocks?: boolean;
  /** Answer `GET /api/decks` with no decks. */
  noDecks?: boolean;
}

/** `METHOD /path/:param` patterns of the fixtures' handlers, matched against a request. */
function matcher(pattern: string): (key: string) => Record<string, string> | null {
  const names: string[] = [];
  const source = pattern.replace(/[.*+?^${}()|[\]\\]/g, '\\$&').replace(/\/:([A-Za-z]+)/g, (_, name: string) => (names.push(name), '/([^/]+)'));
  const regex = new RegExp(`^${source}$`);
  return (key) => {
    const m = regex.exec(key);
    return m ? Object.fromEntries(names.map((n, i) => [n, decodeURIComponent(m[i + 1])])) : null;
  };
}

export async function mockApi(context: BrowserContext, { user, noBlocks = false, noDecks = false }: MockApiOptions) {
  let session: User | null = user;
  const everyone = Object.values(users);
  // The finished run belongs to blocks[1] (runs-fixtures.ts); the other blocks have none yet.
  const { diagnostics: _d, breakdown: _b, files: _f, caution: _c, ...runView } = RUN;
  const runs = [runView, EARLIER_RUN];
  const handlers: [ReturnType<typeof matcher>, Handler][] = Object.entries(runRoutes()).map(([pattern, handler]) => [matcher(pattern), handler]);

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
    if (key === 'GET /api/runs') {
      const blockId = url.searchParams.get('blockId');
      const states = url.searchParams.get('state')?.split(',');
      const items = runs.filter((r) => (!blockId || r.block.id === blockId) && (!states || states.includes(r.state)));
      return reply(route, 200, { items, total: items.length, page: 1, pageSize: Number(url.searchParams.get('pageSize') ?? 25) });
    }
    if (key === 'GET /api/decks') return reply(route, 200, { items: noDecks ? [] : [(({ versions: _v, ...summary }) => summary)(DECK)] });
    if (key === `GET /api/decks/${DECK_ID}`) return reply(route, 200, DECK);
    if (key === `GET /api/decks/${DECK_ID}/versions/${DECK_V1}`) return reply(route, 200, DECK_VERSION);
    if (key === 'GET /api/waivers/for-finding' || key === 'GET /api/tokens') return reply(route, 200, { items: [] });
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
    for (const [match, handler] of handlers) {
      const params = match(key);
      if (!params) continue;
      const res = await handler({ url, method, body, params });
      return route.fulfill({ status: res.status, contentType: res.headers.get('content-type') ?? 'application/json', body: await res.text() });
    }
    return fail(route, 404, 'not-found', `No route ${key} in the mock API.`);
  });
}

export { DEMO_PASSWORD };
