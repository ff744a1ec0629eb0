// Starts the project's PostgreSQL and Redis (server/dev/services.ts), creates a
// fresh database `keepwell_test_<random>` with every migration applied, and hands
// its URL, a Redis database and a key prefix of its own to the API tests through
// vitest's provide/inject. Drops the database and the keys at the end.

import crypto from 'node:crypto';
import pg from 'pg';
import type { TestProject } from 'vitest/node';
import { Redis } from 'ioredis';
import { loadConfig } from '../../server/config';
import { runMigrations } from '../../server/db/migrate';
import { createSequelize } from '../../server/db/sequelize';
import { startServices } from '../../server/dev/services';

declare module 'vitest' {
  export interface ProvidedContext {
    databaseUrl: string;
    redisUrl: string;
    redisPrefix: string;
  }
}

/** Redis database number reserved for tests, so that a developer's running server never sees their keys. */
const TEST_REDIS_DB = 1;

function withDatabase(url: string, database: string): string {
  const u = new URL(url);
  u.pathname = `/${database}`;
  return u.toString();
}

/** A run killed before its teardown leaves its database behind; remove such idle ones older than a day. */
async function dropAbandonedDatabases(admin: pg.Client): Promise<void> {
  const { rows } = await admin.query<{ datname: string; comment: string | null }>(
    `select datname, shobj_description(d.oid, 'pg_database') as comment from pg_database d
     where datname like 'keepwell\\_test\\_%'
       and not exists (select 1 from pg_stat_activity a where a.datname = d.datname)`,
  );
  for (const { datname, comment } of rows) {
    const created = Date.parse(comment?.match(/created (\S+)$/)?.[1] ?? '');
    const abandoned = Number.isNaN(created) || Date.now() - created > 24 * 3600 * 1000;
    if (abandoned) await admin.query(`drop database if exists "${datname}" with (force)`).catch(() => {});
  }
}

export default async function setup(project: TestProject) {
  const config = loadConfig({ ...process.env, NODE_ENV: 'test' });
  await startServices(config);

  const tag = crypto.randomBytes(5).toString('hex');
  const database = `keepwell_test_${tag}`;
  const admin = new pg.Client({ connectionString: config.databaseUrl });
  await admin.connect();
  await dropAbandonedDatabases(admin);
  await admin.query(`create database ${database}`);
  await admin.query(`comment on database ${database} is ${admin.escapeLiteral(`keepwell test database, created ${new Date().toISOString()}`)}`);
  await admin.end();

  const databaseUrl = withDatabase(config.databaseUrl, database);
  const sequelize = createSequelize({ databaseUrl, dbPoolMax: 2 });
  try {
    await runMigrations(sequelize, databaseUrl);
  } finally {
    await sequelize.close();
  }

  const redisUrl = `redis://127.0.0.1:${config.redisPort}/${TEST_REDIS_DB}`;
  const redisPrefix = `keepwell-test-${tag}:`;
  project.provide('databaseUrl', databaseUrl);
  project.provide('redisUrl', redisUrl);
  project.provide('redisPrefix', redisPrefix);

  return async () => {
    const client = new pg.Client({ connectionString: config.databaseUrl });
    await client.connect();
    await client.query(`drop database if exists ${database} with (force)`);
    await client.end();

    const redis = new Redis(redisUrl, { maxRetriesPerRequest: 1 });
    try {
      let cursor = '0';
      do {
        const [next, keys] = await redis.scan(cursor, 'MATCH', `${redisPrefix}*`, 'COUNT', 500);
        if (keys.length) await redis.del(...keys);
        cursor = next;
      } while (cursor !== '0');
    } finally {
      redis.disconnect();
    }
  };
}
