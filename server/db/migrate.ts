// Schema migrations with umzug. Every TypeScript file in server/db/migrations/ is a
// migration, applied in file-name order: name new ones `YYYYMMDD-NN-topic.ts` and
// export `up` (and `down`) typed as `Migration`.
//
//   tsx server/db/migrate.ts up|down|pending|executed

import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import pg from 'pg';
import type { Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug, type MigrationFn } from 'umzug';
import { getConfig } from '../config';
import { createSequelize } from './sequelize';

export interface MigrationContext {
  sequelize: Sequelize;
}
export type Migration = MigrationFn<MigrationContext>;

const migrationsDir = path.join(path.dirname(fileURLToPath(import.meta.url)), 'migrations');

export function createMigrator(sequelize: Sequelize, log = false): Umzug<MigrationContext> {
  return new Umzug<MigrationContext>({
    migrations: {
      glob: ['*.ts', { cwd: migrationsDir, ignore: ['*.d.ts', '*.test.ts'] }],
      // tsx and vitest load TypeScript through import(); umzug's default resolver would require() it.
      resolve: ({ name, path: file }) => {
        const load = async () => (await import(pathToFileURL(file!).href)) as { up: Migration; down?: Migration };
        return {
          name,
          path: file,
          up: async (params) => (await load()).up(params),
          down: async (params) => {
            const mod = await load();
            if (!mod.down) throw new Error(`migration ${name} cannot be undone`);
            return mod.down(params);
          },
        };
      },
    },
    context: { sequelize },
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: log ? console : undefined,
  });
}

// Any fixed 64-bit key: two processes migrating one database at once take turns.
const MIGRATION_LOCK_KEY = 720_514_331;

/** Apply every pending migration, holding an advisory lock so concurrent starters take turns. */
export async function runMigrations(sequelize: Sequelize, databaseUrl: string, log = false): Promise<string[]> {
  const lock = new pg.Client({ connectionString: databaseUrl });
  await lock.connect();
  try {
    await lock.query('select pg_advisory_lock($1)', [MIGRATION_LOCK_KEY]);
    const applied = await createMigrator(sequelize, log).up();
    return applied.map((m) => m.name);
  } finally {
    await lock.query('select pg_advisory_unlock($1)', [MIGRATION_LOCK_KEY]).catch(() => {});
    await lock.end();
  }
}

async function main(argv: string[]): Promise<number> {
  const config = getConfig();
  const sequelize = createSequelize(config);
  try {
    const migrator = createMigrator(sequelize, true);
    switch (argv[0] ?? 'up') {
      case 'up': {
        const applied = await runMigrations(sequelize, config.databaseUrl, true);
        console.log(applied.length ? `applied ${applied.length} migration(s)` : 'database is up to date');
        return 0;
      }
      case 'down':
        await migrator.down();
        return 0;
      case 'pending':
        for (const m of await migrator.pending()) console.log(m.name);
        return 0;
      case 'executed':
        for (const m of await migrator.executed()) console.log(m.name);
        return 0;
      default:
        console.error('usage: tsx server/db/migrate.ts up|down|pending|executed');
        return 2;
    }
  } finally {
    await sequelize.close();
  }
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main(process.argv.slice(2)).then(
    (code) => process.exit(code),
    (err) => {
      console.error(err instanceof Error ? err.message : err);
      process.exit(1);
    },
  );
}
