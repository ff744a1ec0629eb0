// Private servers for the fault tests: a redis-server of the project's Debian package on a free
// port, without persistence, so that a restart after SIGKILL comes back empty as a crashed cache
// would; the tests then see whether PostgreSQL's record of the runs brings every run back.

import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { Redis } from 'ioredis';

function redisBinary(): string {
  for (const candidate of ['/usr/bin/redis-server', '/usr/local/bin/redis-server']) if (fs.existsSync(candidate)) return candidate;
  const found = spawnSync('sh', ['-c', 'command -v redis-server'], { encoding: 'utf8' }).stdout.trim();
  if (!found) throw new Error('redis-server is not installed (server/dev/services.ts installs it on npm start and npm test)');
  return found;
}

export async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const server = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

export class PrivateRedis {
  private child?: ChildProcess;
  readonly dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keepwell-redis-'));
  constructor(readonly port: number) {}

  async start(): Promise<void> {
    this.child = spawn(redisBinary(), ['--port', String(this.port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', this.dir], { stdio: 'ignore' });
    const deadline = Date.now() + 10_000;
    for (;;) {
      const client = new Redis({ port: this.port, host: '127.0.0.1', lazyConnect: true, maxRetriesPerRequest: 0, retryStrategy: () => null });
      client.on('error', () => {});
      try {
        await client.connect();
        if ((await client.ping()) === 'PONG') return;
      } catch {
        if (Date.now() > deadline) throw new Error(`private Redis on ${this.port} did not start`);
        await new Promise((r) => setTimeout(r, 100));
      } finally {
        client.disconnect();
      }
    }
  }

  async kill(): Promise<void> {
    const child = this.child;
    if (!child || child.exitCode !== null || child.signalCode !== null) return;
    const gone = new Promise((r) => child.once('exit', r));
    child.kill('SIGKILL');
    await gone;
  }

  async dispose(): Promise<void> {
    await this.kill();
    fs.rmSync(this.dir, { recursive: true, force: true });
  }
}
