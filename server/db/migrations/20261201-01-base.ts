// The base schema. Later migrations extend it; never edit this one once it has shipped.
// Column names follow the brief and shared/ field names in snake_case; `column`,
// `limit` and `to` are reserved words in SQL and must be quoted in raw queries.

import type { Migration } from '../migrate';

export const up: Migration = async ({ context: { sequelize } }) => {
  await sequelize.transaction(async (transaction) => {
    await sequelize.query(
      `
create table teams (
  id uuid primary key default gen_random_uuid(),
  name text not null unique,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now()
);

create table users (
  id uuid primary key default gen_random_uuid(),
  email text not null unique check (email = lower(email)),
  name text not null,
  -- null until an invited user accepts and chooses a password
  password_hash text,
  roles text[] not null default '{}' check (roles <@ array['designer','methodology','reviewer','admin']::text[]),
  team_id uuid references teams(id) on delete restrict,
  disabled boolean not null default false,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  last_sign_in_at timestamptz
);
create index users_team_idx on users (team_id);

-- The shape @lucia-auth/adapter-postgresql reads and writes.
create table user_sessions (
  id text primary key,
  user_id uuid not null references users(id) on delete cascade,
  expires_at timestamptz not null,
  created_at timestamptz not null default now()
);
create index user_sessions_user_idx on user_sessions (user_id);
create index user_sessions_expiry_idx on user_sessions (expires_at);

create table password_reset_tokens (
  id uuid primary key default gen_random_uuid(),
  user_id uuid not null references users(id) on delete cascade,
  token_hash text not null unique,
  expires_at timestamptz not null,
  used_at timestamptz,
  created_at timestamptz not null default now()
);
create index password_reset_tokens_user_idx on password_reset_tokens (user_id);

create table invitations (
  id uuid primary key default gen_random_uuid(),
  team_id uuid not null references teams(id) on delete cascade,
  -- the invited user, created without a password when the invitation is sent
  user_id uuid not null references users(id) on delete cascade,
  email text not null,
  invited_by uuid references users(id) on delete set null,
  token_hash text not null unique,
  expires_at timestamptz not null,
  used_at timestamptz,
  created_at timestamptz not null default now()
);
create index invitations_user_idx on invitations (user_id);

create table blocks (
  id uuid primary key default gen_random_uuid(),
  team_id uuid not null references teams(id) on delete cascade,
  name text not null,
  description text not null default '',
  created_by uuid references users(id) on delete set null,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  unique (team_id, name)
);

create table netlists (
  id uuid primary key default gen_random_uuid(),
  team_id uuid not null references teams(id) on delete cascade,
  block_id uuid not null references blocks(id) on delete cascade,
  uploaded_by uuid references users(id) on delete set null,
  file_count integer not null default 0,
  total_bytes bigint not null default 0,
  created_at timestamptz not null default now()
);
create index netlists_block_idx on netlists (block_id, created_at desc);

create table netlist_files (
  id uuid primary key default gen_random_uuid(),
  netlist_id uuid not null references netlists(id) on delete cascade,
  path text not null,
  sha256 text not null check (sha256 ~ '^[0-9a-f]{64}$'),
  size bigint not null check (size >= 0),
  content bytea not null,
  created_at timestamptz not null default now(),
  unique (netlist_id, path)
);
create index netlist_files_sha_idx on netlist_files (sha256);

create table rule_decks (
  id uuid primary key default gen_random_uuid(),
  team_id uuid not null references teams(id) on delete cascade,
  name text not null,
  description text not null default '',
  default_version_id uuid,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  unique (team_id, name)
);

create table rule_deck_versions (
  id uuid primary key default gen_random_uuid(),
  deck_id uuid not null references rule_decks(id) on delete cascade,
  version integer not null check (version >= 1),
  state text not null default 'draft' check (state in ('draft', 'published')),
  -- a full shared/deck.ts Deck
  content jsonb not null,
  change_note text not null default '',
  created_by uuid references users(id) on delete set null,
  published_by uuid references users(id) on delete set null,
  published_at timestamptz,
  lock_version integer not null default 0,
  parent_version_id uuid references rule_deck_versions(id) on delete set null,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  unique (deck_id, version),
  check ((state = 'published') = (published_at is not null))
);

alter table rule_decks
  add constraint rule_decks_default_version_fk foreign key (default_version_id) references rule_deck_versions(id) on delete set null;

create table runs (
  id uuid primary key default gen_random_uuid(),
  team_id uuid not null references teams(id) on delete cascade,
  block_id uuid not null references blocks(id) on delete cascade,
  netlist_id uuid not null references netlists(id) on delete restrict,
  deck_version_id uuid not null references rule_deck_versions(id) on delete restrict,
  submitted_by uuid references users(id) on delete set null,
  state text not null default 'queued' check (state in ('queued', 'running', 'succeeded', 'failed', 'cancelled')),
  progress jsonb,
  attempt integer not null default 0,
  error text,
  summary jsonb,
  note text not null default '',
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  started_at timestamptz,
  finished_at timestamptz
);
create index runs_team_idx on runs (team_id, created_at desc);
create index runs_block_idx on runs (block_id, created_at desc);
create index runs_state_idx on runs (state) where state in ('queued', 'running');

create table findings (
  id bigserial primary key,
  run_id uuid not null references runs(id) on delete cascade,
  rule_id text not null,
  severity text not null check (severity in ('error', 'warning', 'info')),
  message text not null,
  file text not null,
  line integer not null,
  "column" integer not null,
  cell text not null,
  nets text[] not null default '{}',
  devices text[] not null default '{}',
  instances double precision not null,
  measured jsonb,
  "limit" jsonb,
  fingerprint text not null,
  corner text,
  plot jsonb
);
create index findings_run_idx on findings (run_id, id);
create index findings_run_severity_idx on findings (run_id, severity, id);
create index findings_run_rule_idx on findings (run_id, rule_id, id);
create index findings_run_cell_idx on findings (run_id, cell, id);
create index findings_run_fingerprint_idx on findings (run_id, fingerprint);

create table waivers (
  id uuid primary key default gen_random_uuid(),
  team_id uuid not null references teams(id) on delete cascade,
  block_id uuid references blocks(id) on delete cascade,
  rule_id text not null,
  cell text,
  fingerprint text,
  scope text not null,
  justification text not null,
  state text not null default 'requested' check (state in ('requested', 'approved', 'rejected', 'revoked')),
  requested_by uuid references users(id) on delete set null,
  decided_by uuid references users(id) on delete set null,
  decision_comment text,
  decided_at timestamptz,
  expires_at timestamptz,
  -- what the waiver was granted against (measured value, deck version, …)
  bound jsonb,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now()
);
create index waivers_lookup_idx on waivers (team_id, block_id, rule_id);
create index waivers_fingerprint_idx on waivers (fingerprint) where fingerprint is not null;

create table audit_events (
  id bigserial primary key,
  team_id uuid references teams(id) on delete cascade,
  actor_id uuid references users(id) on delete set null,
  action text not null,
  subject_type text not null,
  subject_id text,
  detail jsonb not null default '{}',
  created_at timestamptz not null default now()
);
create index audit_events_team_idx on audit_events (team_id, created_at desc, id desc);

-- The outbox: every outgoing message, written in the request, delivered in the background.
create table mail_messages (
  id uuid primary key default gen_random_uuid(),
  team_id uuid references teams(id) on delete cascade,
  "to" text not null,
  subject text not null,
  text text not null,
  html text,
  status text not null default 'queued' check (status in ('queued', 'sent', 'failed')),
  error text,
  attempts integer not null default 0,
  next_attempt_at timestamptz not null default now(),
  created_at timestamptz not null default now(),
  sent_at timestamptz
);
create index mail_messages_due_idx on mail_messages (next_attempt_at) where status = 'queued';
create index mail_messages_team_idx on mail_messages (team_id, created_at desc);

create table api_tokens (
  id uuid primary key default gen_random_uuid(),
  user_id uuid not null references users(id) on delete cascade,
  name text not null,
  token_hash text not null unique,
  scope text not null check (scope in ('read', 'submit')),
  created_at timestamptz not null default now(),
  last_used_at timestamptz,
  revoked_at timestamptz
);
create index api_tokens_user_idx on api_tokens (user_id);
`,
      { transaction },
    );
  });
};

export const down: Migration = async ({ context: { sequelize } }) => {
  await sequelize.query(`
drop table if exists api_tokens, mail_messages, audit_events, waivers, findings, runs;
alter table if exists rule_decks drop constraint if exists rule_decks_default_version_fk;
drop table if exists rule_deck_versions, rule_decks, netlist_files, netlists, blocks, invitations,
  password_reset_tokens, user_sessions, users, teams;
`);
};
