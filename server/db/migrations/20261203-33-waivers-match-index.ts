// Every waiver names the cell of the finding it was asked on, and matching compares
// cells as SPICE does, without regard to case: one index lookup per finding finds the
// few waivers that can decide it (server/services/waivers-status.ts).

import type { Migration } from '../migrate';

export const up: Migration = async ({ context: { sequelize } }) => {
  await sequelize.transaction(async (transaction) => {
    await sequelize.query(
      `
alter table waivers add constraint waivers_cell_check check (cell is not null);
drop index if exists waivers_match_idx;
create index waivers_match_idx on waivers (team_id, rule_id, lower(cell)) where state in ('approved', 'requested');
`,
      { transaction },
    );
  });
};

export const down: Migration = async ({ context: { sequelize } }) => {
  await sequelize.query(`
drop index if exists waivers_match_idx;
create index waivers_match_idx on waivers (team_id, rule_id, cell) where state in ('approved', 'requested');
alter table waivers drop constraint if exists waivers_cell_check;
`);
};
