// Personal API tokens (server/services/tokens-api.ts): a short visible hint of each
// token, so that its owner can tell tokens apart in the list; the secret itself is
// only ever stored as an HMAC (token_hash).

import type { Migration } from '../migrate';

export const up: Migration = async ({ context: { sequelize } }) => {
  await sequelize.query(`alter table api_tokens add column token_hint text not null default ''`);
};

export const down: Migration = async ({ context: { sequelize } }) => {
  await sequelize.query(`alter table api_tokens drop column if exists token_hint`);
};
