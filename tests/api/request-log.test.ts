// One log line per API request with method, path, status, duration and user id,
// and nothing else: no bodies, no query strings, no cookies (the brief; OWASP
// Logging cheat sheet: never log session ids, passwords or tokens).

import http from 'node:http';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { createTeam, createUser, PUBLIC_URL, startTestEnv, type TestEnv } from './helpers';

let env: TestEnv;
let server: http.Server;
const lines: string[] = [];

beforeAll(async () => {
  env = await startTestEnv();
  server = http.createServer(createApp({ ...env.ctx, config: { ...env.config, logRequests: true } }, { logLine: (l) => lines.push(l) }));
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
});
afterAll(async () => {
  server?.closeAllConnections();
  await new Promise((r) => server?.close(r));
  await env?.close();
});

describe('request log', () => {
  it('writes method, path, status, duration and user id, and never the password, session or query', async () => {
    const team = await createTeam();
    const { user, email, password } = await createUser({ team, roles: ['designer'] });
    const agent = request.agent(server).set('Origin', PUBLIC_URL);
    const login = await agent.post('/api/auth/login').send({ email, password }).expect(200);
    const sessionId = String(login.headers['set-cookie']).split(';')[0].split('=')[1];
    await request(server).get('/api/auth/me').expect(401);
    await agent.get('/api/blocks?search=secret-term').expect(200);
    await agent.get('/api/nowhere').expect(404);

    expect(lines).toHaveLength(4);
    expect(lines[0]).toMatch(new RegExp(`^\\d{4}-\\d\\d-\\d\\dT[\\d:.]+Z POST /api/auth/login 200 \\d+\\.\\dms user=${user.id}$`));
    expect(lines[1]).toMatch(/ GET \/api\/auth\/me 401 [\d.]+ms user=-$/);
    expect(lines[2]).toMatch(new RegExp(`^\\S+ GET /api/blocks 200 \\d+\\.\\dms user=${user.id}$`));
    expect(lines[3]).toMatch(/ GET \/api\/nowhere 404 /);
    const all = lines.join('\n');
    for (const secret of [password, email, sessionId, 'secret-term']) expect(all).not.toContain(secret);
  });
});
