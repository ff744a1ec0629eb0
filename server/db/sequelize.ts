// One Sequelize instance per process, over pg. Models are initialised on it by
// models/index.ts; services import the models and, for transactions, this instance.

import { Sequelize } from 'sequelize';
import pg from 'pg';
import type { Config } from '../config';

// Return bigint columns (bigserial ids, byte counts) as JS numbers: every such value
// here stays far below 2^53.
pg.types.setTypeParser(pg.types.builtins.INT8, (value: string) => Number(value));

export function createSequelize(config: Pick<Config, 'databaseUrl' | 'dbPoolMax'>): Sequelize {
  return new Sequelize(config.databaseUrl, {
    dialect: 'postgres',
    dialectModule: pg,
    logging: false,
    pool: { max: config.dbPoolMax, min: 0, idle: 10_000, acquire: 30_000 },
    define: { underscored: true },
  });
}
