// The outbox. A request writes its message as a mail_messages row (inside its own
// transaction when it has one) and returns; delivery happens here, in the
// background, with retries. Rows are claimed with a short lease, so several server
// processes can share one outbox and a message claimed by a process that died is
// picked up again when the lease runs out.

import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { Transporter } from 'nodemailer';
import { MailMessage } from '../db/models';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string | null;
  teamId?: string | null;
}

export interface OutboxOptions {
  sequelize: Sequelize;
  transport: Transporter;
  from: string;
  maxAttempts: number;
  /** Delay before the first retry; retry n waits retrySeconds × 4^(n−1). */
  retrySeconds: number;
  /** How often to look for due messages (retries, and rows another process wrote). */
  pollMs?: number;
  onError?: (err: unknown) => void;
}

const LEASE_SECONDS = 120;
const BATCH = 20;

interface ClaimedRow {
  id: string;
  to: string;
  subject: string;
  text: string;
  html: string | null;
  attempts: number;
}

export class Outbox {
  private timer: NodeJS.Timeout | undefined;
  private running: Promise<void> | undefined;
  private again = false;
  private stopped = true;

  constructor(private readonly options: OutboxOptions) {}

  /** Record a message for delivery. With a transaction, delivery starts once it commits. */
  async enqueue(mail: OutgoingMail, transaction?: Transaction): Promise<MailMessage> {
    const row = await MailMessage.create(
      { to: mail.to, subject: mail.subject, text: mail.text, html: mail.html ?? null, teamId: mail.teamId ?? null, error: null, sentAt: null },
      { transaction },
    );
    if (transaction) transaction.afterCommit(() => this.kick());
    else this.kick();
    return row;
  }

  start(): void {
    if (!this.stopped) return;
    this.stopped = false;
    const pollMs = this.options.pollMs ?? 2000;
    this.timer = setInterval(() => this.kick(), pollMs);
    this.timer.unref();
    this.kick();
  }

  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearInterval(this.timer);
    this.timer = undefined;
    await this.running;
  }

  /** Deliver what is due now, soon. Never throws. */
  kick(): void {
    if (this.stopped) return;
    if (this.running) {
      this.again = true;
      return;
    }
    this.running = this.loop().finally(() => {
      this.running = undefined;
      if (this.again && !this.stopped) {
        this.again = false;
        this.kick();
      }
    });
  }

  /** Resolves when nothing is being delivered and nothing is due now (tests await delivery with it). */
  async whenIdle(): Promise<void> {
    for (;;) {
      if (this.running) await this.running;
      if (!(await this.hasDue())) return;
      this.kick();
      if (!this.running) return;
    }
  }

  private async loop(): Promise<void> {
    try {
      for (;;) {
        const batch = await this.claimDue();
        if (batch.length === 0) return;
        for (const row of batch) await this.deliver(row);
      }
    } catch (err) {
      this.options.onError?.(err);
    }
  }

  private async hasDue(): Promise<boolean> {
    const rows = await this.options.sequelize.query(
      `select 1 from mail_messages where status = 'queued' and next_attempt_at <= now() limit 1`,
      { type: QueryTypes.SELECT },
    );
    return rows.length > 0;
  }

  private async claimDue(): Promise<ClaimedRow[]> {
    return this.options.sequelize.query<ClaimedRow>(
      `update mail_messages set attempts = attempts + 1, next_attempt_at = now() + make_interval(secs => :lease)
       where id in (
         select id from mail_messages
         where status = 'queued' and next_attempt_at <= now()
         order by next_attempt_at, created_at
         limit :batch
         for update skip locked)
       returning id, "to", subject, text, html, attempts`,
      { type: QueryTypes.SELECT, replacements: { lease: LEASE_SECONDS, batch: BATCH } },
    );
  }

  private async deliver(row: ClaimedRow): Promise<void> {
    try {
      await this.options.transport.sendMail({
        from: this.options.from,
        to: row.to,
        subject: row.subject,
        text: row.text,
        html: row.html ?? undefined,
        headers: { 'X-Keepwell-Message': row.id },
      });
      await MailMessage.update({ status: 'sent', sentAt: new Date(), error: null }, { where: { id: row.id } });
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      if (row.attempts >= this.options.maxAttempts) {
        await MailMessage.update({ status: 'failed', error: message }, { where: { id: row.id } });
      } else {
        const delay = this.options.retrySeconds * 4 ** (row.attempts - 1);
        await MailMessage.update({ error: message, nextAttemptAt: new Date(Date.now() + delay * 1000) }, { where: { id: row.id } });
        // Come back when the retry is due rather than at the next poll.
        setTimeout(() => this.kick(), delay * 1000 + 10).unref();
      }
    }
  }
}
