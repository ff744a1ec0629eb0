// The built client as server/main.ts serves it: hashed assets cached for a year
// and marked immutable (RFC 9111 §5.2.2.1 max-age; RFC 8246 immutable), the page
// itself revalidated (no-cache), client routes answered with the one page, and
// /api never swallowed by the fallback.

import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { startTestEnv, type TestEnv } from './helpers';

let env: TestEnv;
let server: http.Server;
let dir: string;

beforeAll(async () => {
  env = await startTestEnv();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keepwell-client-'));
  fs.mkdirSync(path.join(dir, 'assets'));
  fs.writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>Keepwell test page</title><div id="root"></div>');
  fs.writeFileSync(path.join(dir, 'assets', 'main-Ab12Cd34.js'), 'console.log("bundle")');
  fs.writeFileSync(path.join(dir, 'keepwell-mark.svg'), '<svg xmlns="http://www.w3.org/2000/svg"/>');
  server = http.createServer(createApp(env.ctx, { clientDir: dir }));
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
});
afterAll(async () => {
  server?.closeAllConnections();
  await new Promise((r) => server?.close(r));
  await env?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('client serving', () => {
  it('caches hashed assets for a year as immutable', async () => {
    const res = await request(server).get('/assets/main-Ab12Cd34.js').expect(200);
    expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(res.text).toContain('bundle');
    await request(server).get('/assets/missing-00000000.js').expect(404);
  });

  it('answers client routes with the page, revalidated on every load', async () => {
    for (const route of ['/', '/blocks/some-block', '/reset-password?token=abc']) {
      const res = await request(server).get(route).set('Accept', 'text/html').expect(200);
      expect(res.text).toContain('Keepwell test page');
      expect(res.headers['cache-control']).toBe('no-cache');
    }
    const icon = await request(server).get('/keepwell-mark.svg').expect(200);
    expect(icon.headers['cache-control']).toBe('no-cache');
  });

  it('keeps /api answers JSON', async () => {
    const res = await request(server).get('/api/not-a-route').set('Accept', 'text/html').expect(404);
    expect(res.headers['content-type']).toMatch(/application\/json/);
    await request(server).get('/api/health').expect(200);
  });
});
