// Waivers as the waiver service uses them (server/services/waivers.ts): the three
// scopes, the finding a waiver was asked on (its devices and nets, so a changed
// circuit can be shown as the reason a waiver lapsed), the measured value it was
// granted against, revocation (nothing is deleted), and the one expiry warning.

import type { Migration } from '../migrate';

export const up: Migration = async ({ context: { sequelize } }) => {
  await sequelize.transaction(async (transaction) => {
    await sequelize.query(
      `
alter table waivers
  add column source_run_id uuid references runs(id) on delete set null,
  -- findings go with their run; the id is kept for the link only
  add column source_finding_id bigint,
  add column severity text check (severity in ('error', 'warning', 'info')),
  add column message text not null default '',
  add column devices text[] not null default '{}',
  add column nets text[] not null default '{}',
  -- the finding's measured value when the waiver was asked for
  add column measured jsonb,
  add column revoked_by uuid references users(id) on delete set null,
  add column revoked_at timestamptz,
  add column revoke_reason text,
  add column expiry_warned_at timestamptz;

-- finding: one fingerprint in one block; cell: that fingerprint in every block
-- (every instance of the cell); rule-in-cell: every finding of the rule in the cell.
alter table waivers add constraint waivers_scope_check check (
  (scope = 'finding' and fingerprint is not null and block_id is not null)
  or (scope = 'cell' and fingerprint is not null and cell is not null)
  or (scope = 'rule-in-cell' and fingerprint is null and cell is not null));
alter table waivers add constraint waivers_revoked_check check ((state = 'revoked') = (revoked_at is not null));
alter table waivers add constraint waivers_bound_check check (
  bound is null or (jsonb_typeof(bound->'value') = 'number' and bound->>'sense' in ('max', 'min') and jsonb_typeof(bound->'unit') = 'string'));

-- Matching reads a team's live waivers of one rule for every finding it decides.
create index waivers_match_idx on waivers (team_id, rule_id, cell) where state in ('approved', 'requested');
create index waivers_expiry_idx on waivers (expires_at) where state = 'approved' and expires_at is not null and expiry_warned_at is null;
`,
      { transaction },
    );
  });
};

export const down: Migration = async ({ context: { sequelize } }) => {
  await sequelize.query(`
drop index if exists waivers_match_idx, waivers_expiry_idx;
alter table waivers drop constraint if exists waivers_scope_check, drop constraint if exists waivers_revoked_check,
  drop constraint if exists waivers_bound_check;
alter table waivers drop column if exists source_run_id, drop column if exists source_finding_id, drop column if exists severity,
  drop column if exists message, drop column if exists devices, drop column if exists nets, drop column if exists measured,
  drop column if exists revoked_by, drop column if exists revoked_at, drop column if exists revoke_reason,
  drop column if exists expiry_warned_at;
`);
};
