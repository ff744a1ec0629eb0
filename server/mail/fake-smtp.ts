// A local SMTP server for development and tests (smtp-server + mailparser). It
// accepts every message on loopback, keeps the parsed copies in memory, and in
// development also writes each one as an .eml file under the data folder.

import fs from 'node:fs';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export interface CapturedMail {
  to: string[];
  from: string;
  subject: string;
  text: string;
  html: string | null;
  messageId: string | null;
  receivedAt: Date;
  raw: Buffer;
}

export interface FakeSmtp {
  host: string;
  port: number;
  messages: CapturedMail[];
  /** Resolves with the first captured message (already received or arriving later) that matches. */
  waitFor(match: (mail: CapturedMail) => boolean, timeoutMs?: number): Promise<CapturedMail>;
  close(): Promise<void>;
}

export async function startFakeSmtp(options: { host?: string; port?: number; captureDir?: string; log?: boolean } = {}): Promise<FakeSmtp> {
  const host = options.host ?? '127.0.0.1';
  const messages: CapturedMail[] = [];
  const waiters = new Set<{ match: (m: CapturedMail) => boolean; resolve: (m: CapturedMail) => void }>();
  if (options.captureDir) fs.mkdirSync(options.captureDir, { recursive: true });

  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    size: 10 * 1024 * 1024,
    logger: false,
    banner: 'Keepwell development mail catcher',
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('error', callback);
      stream.on('end', () => {
        const raw = Buffer.concat(chunks);
        simpleParser(raw).then(
          (parsed) => {
            const mail: CapturedMail = {
              to: session.envelope.rcptTo.map((r) => r.address),
              from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
              subject: parsed.subject ?? '',
              text: parsed.text ?? '',
              html: typeof parsed.html === 'string' ? parsed.html : null,
              messageId: parsed.messageId ?? null,
              receivedAt: new Date(),
              raw,
            };
            messages.push(mail);
            if (options.captureDir) {
              const name = `${mail.receivedAt.toISOString().replace(/[:.]/g, '-')}-${messages.length}.eml`;
              fs.writeFileSync(path.join(options.captureDir, name), raw);
            }
            if (options.log) process.stdout.write(`mail: captured "${mail.subject}" to ${mail.to.join(', ')}\n`);
            for (const w of [...waiters]) {
              if (w.match(mail)) {
                waiters.delete(w);
                w.resolve(mail);
              }
            }
            callback();
          },
          (err: Error) => callback(err),
        );
      });
    },
  });

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? 0, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  const port = (server.server.address() as AddressInfo).port;

  return {
    host,
    port,
    messages,
    waitFor(match, timeoutMs = 10_000) {
      const found = messages.find(match);
      if (found) return Promise.resolve(found);
      return new Promise((resolve, reject) => {
        const waiter = {
          match,
          resolve: (m: CapturedMail) => {
            clearTimeout(timer);
            resolve(m);
          },
        };
        const timer = setTimeout(() => {
          waiters.delete(waiter);
          reject(new Error(`no matching mail within ${timeoutMs} ms (${messages.length} captured)`));
        }, timeoutMs);
        waiters.add(waiter);
      });
    },
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
