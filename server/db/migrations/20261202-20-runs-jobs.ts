// Check runs as queued jobs: the hash that recognises a re-uploaded file set, what a
// run was asked to check and found while reading, the executions of its jobs (one
// row per job a worker started, so retries and double work are visible), and the
// staged results of the child jobs of a split run until the merge job writes them.

import type { Migration } from '../migrate';

export const up: Migration = async ({ context: { sequelize } }) => {
  await sequelize.transaction(async (transaction) => {
    await sequelize.query(
      `
alter table netlists
  add column content_hash text check (content_hash ~ '^[0-9a-f]{64}$');
-- One stored copy of each distinct file set per block.
create unique index netlists_block_content_idx on netlists (block_id, content_hash) where content_hash is not null;

alter table runs
  add column top_cell text,
  add column parts integer check (parts is null or parts >= 1),
  add column diagnostics jsonb not null default '[]',
  add column breakdown jsonb,
  add column cancelled_by uuid references users(id) on delete set null;
create index runs_team_state_idx on runs (team_id, state, created_at desc);
create index runs_team_submitter_idx on runs (team_id, submitted_by, created_at desc);

create table run_attempts (
  id bigserial primary key,
  run_id uuid not null references runs(id) on delete cascade,
  job_id text not null,
  kind text not null check (kind in ('run', 'part', 'merge')),
  -- BullMQ's count of earlier attempts of this job, plus one
  attempt integer not null,
  worker text not null,
  started_at timestamptz not null default now(),
  finished_at timestamptz,
  outcome text check (outcome in ('succeeded', 'split', 'staged', 'failed', 'skipped', 'cancelled', 'superseded')),
  error text
);
create index run_attempts_run_idx on run_attempts (run_id, id);

create table run_parts (
  run_id uuid not null references runs(id) on delete cascade,
  part integer not null check (part >= 0),
  cells integer not null,
  -- shared/findings.ts Finding[] of the part's cells
  findings jsonb not null,
  -- cell name → occurrences in the flattened design, for the cells of the part
  cell_counts jsonb not null default '{}',
  created_at timestamptz not null default now(),
  primary key (run_id, part)
);
`,
      { transaction },
    );
  });
};

export const down: Migration = async ({ context: { sequelize } }) => {
  await sequelize.query(`
drop table if exists run_parts, run_attempts;
drop index if exists runs_team_state_idx, runs_team_submitter_idx, netlists_block_content_idx;
alter table runs drop column if exists top_cell, drop column if exists parts, drop column if exists diagnostics,
  drop column if exists breakdown, drop column if exists cancelled_by;
alter table netlists drop column if exists content_hash;
`);
};
