// The web server: API and built client on KEEPWELL_HOST:KEEPWELL_PORT. In
// development it also runs the capturing SMTP server. Migrations are run by
// `npm run migrate` or `npm start`, never here.

import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { getConfig, repoRoot } from './config';
import { createApp } from './app';
import { createContext } from './context';
import { startFakeSmtp, type FakeSmtp } from './mail/fake-smtp';

async function main(): Promise<void> {
  const config = getConfig();
  let smtp: FakeSmtp | undefined;
  if (config.fakeSmtp) {
    smtp = await startFakeSmtp({ host: config.smtp.host, port: config.smtp.port, captureDir: path.join(config.dataDir, 'mail'), log: true });
  }
  const ctx = createContext(config);
  const app = createApp(ctx, { clientDir: path.join(repoRoot, 'dist', 'client') });
  const server = app.listen(config.port, config.host);
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });
  const { port } = server.address() as AddressInfo;
  process.stdout.write(`keepwell: listening on http://${config.host}:${port} (public URL ${config.publicUrl})\n`);
  if (smtp) process.stdout.write(`keepwell: development mail is captured on ${smtp.host}:${smtp.port}, copies in ${path.join(config.dataDir, 'mail')}\n`);

  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    server.close();
    server.closeAllConnections();
    await ctx.close();
    await smtp?.close();
    process.exit(0);
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((err) => {
  process.stderr.write(`keepwell: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
