// Paging a run's findings fast at any size: one index per sort order the API offers
// (each ending in id, so pages are stable), a severity rank that sorts errors first,
// and a trigram index over the text a user searches (message, nets, devices).
// pg_trgm is a trusted extension (PostgreSQL 13+): the database owner may create it.

import type { Migration } from '../migrate';

export const up: Migration = async ({ context: { sequelize } }) => {
  await sequelize.transaction(async (transaction) => {
    await sequelize.query(
      `
create extension if not exists pg_trgm;

alter table findings
  add column severity_rank smallint generated always as (case severity when 'error' then 0 when 'warning' then 1 else 2 end) stored,
  -- lower-case message, nets and devices, written with the finding
  add column search_text text not null default '';

-- The engine reports each fingerprint once per run; a retried write can never duplicate one.
create unique index findings_run_fingerprint_key on findings (run_id, fingerprint);
create index findings_run_rank_idx on findings (run_id, severity_rank, id);
create index findings_run_location_idx on findings (run_id, file, line, "column", id);
create index findings_run_instances_idx on findings (run_id, instances, id);
create index findings_search_trgm_idx on findings using gin (search_text gin_trgm_ops);
`,
      { transaction },
    );
  });
};

export const down: Migration = async ({ context: { sequelize } }) => {
  await sequelize.query(`
drop index if exists findings_run_fingerprint_key, findings_run_rank_idx, findings_run_location_idx,
  findings_run_instances_idx, findings_search_trgm_idx;
alter table findings drop column if exists severity_rank, drop column if exists search_text;
`);
};
