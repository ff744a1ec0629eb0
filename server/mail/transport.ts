// The one way mail leaves Keepwell: nodemailer over SMTP, pointed at the fake
// capturing server in development and tests and at a real host in production.

import nodemailer, { type Transporter } from 'nodemailer';
import type { Config } from '../config';

export function createMailTransport(config: Pick<Config, 'smtp'>): Transporter {
  const { host, port, secure, user, password } = config.smtp;
  return nodemailer.createTransport({
    host,
    port,
    secure,
    auth: user ? { user, pass: password ?? '' } : undefined,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  });
}
