// Everything a request handler or service may need, created once per process:
// configuration, the database (Sequelize for models, a pg pool for lucia), Redis,
// sessions and the mail outbox. main.ts builds one; tests build one per file.

import pg from 'pg';
import { Redis } from 'ioredis';
import type { Sequelize } from 'sequelize';
import type { Config } from './config';
import { initModels } from './db/models';
import { createSequelize } from './db/sequelize';
import { Outbox } from './mail/outbox';
import { createMailTransport } from './mail/transport';
import { createLucia, type KeepwellLucia } from './services/sessions';

export interface AppContext {
  config: Config;
  sequelize: Sequelize;
  /** Used by lucia's adapter; models go through `sequelize`. */
  pool: pg.Pool;
  redis: Redis;
  lucia: KeepwellLucia;
  outbox: Outbox;
  close(): Promise<void>;
}

export function createRedis(config: Pick<Config, 'redisUrl'>): Redis {
  const redis = new Redis(config.redisUrl, {
    // Fail a command quickly when Redis is away instead of queueing it forever;
    // the connection itself keeps retrying in the background.
    maxRetriesPerRequest: 2,
    connectTimeout: 5000,
    lazyConnect: false,
  });
  redis.on('error', () => {
    // Reconnection is automatic; /api/health reports the outage.
  });
  return redis;
}

/** The mail outbox over the database (not started: `start()` delivers in the background). */
export function createOutbox(config: Config, sequelize: Sequelize): Outbox {
  return new Outbox({
    sequelize,
    transport: createMailTransport(config),
    from: config.mailFrom,
    maxAttempts: config.mailMaxAttempts,
    retrySeconds: config.mailRetrySeconds,
    onError: (err) => console.error('outbox:', err instanceof Error ? err.message : err),
  });
}

export function createContext(config: Config, options: { startOutbox?: boolean } = {}): AppContext {
  const sequelize = createSequelize(config);
  initModels(sequelize);
  const pool = new pg.Pool({ connectionString: config.databaseUrl, max: Math.max(2, Math.ceil(config.dbPoolMax / 2)) });
  pool.on('error', () => {
    // An idle client lost its connection (database restart); the pool replaces it.
  });
  const redis = createRedis(config);
  const lucia = createLucia(pool, config);
  const outbox = createOutbox(config, sequelize);
  if (options.startOutbox ?? true) outbox.start();

  return {
    config,
    sequelize,
    pool,
    redis,
    lucia,
    outbox,
    async close() {
      await outbox.stop();
      redis.disconnect();
      await pool.end();
      await sequelize.close();
    },
  };
}
