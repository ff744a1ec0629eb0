// Rule deck versions: one team default deck, at most one open draft per deck, and
// published versions the database itself refuses to change (a run's deck must never
// change under it, whatever code path tries).

import type { Migration } from '../migrate';

export const up: Migration = async ({ context: { sequelize } }) => {
  await sequelize.transaction(async (transaction) => {
    await sequelize.query(
      `
alter table rule_decks add column team_default boolean not null default false;
create unique index rule_decks_one_team_default_idx on rule_decks (team_id) where team_default;

create unique index rule_deck_versions_one_draft_idx on rule_deck_versions (deck_id) where state = 'draft';
create index rule_deck_versions_deck_idx on rule_deck_versions (deck_id, version desc);

-- Teams that already have decks: the oldest one becomes the default.
update rule_decks d set team_default = true
where d.id = (select id from rule_decks o where o.team_id = d.team_id order by created_at, id limit 1)
  and not exists (select 1 from rule_decks t where t.team_id = d.team_id and t.team_default);

create function rule_deck_versions_keep_published() returns trigger language plpgsql as $$
begin
  if old.state = 'published' and (
       new.state is distinct from old.state
    or new.content is distinct from old.content
    or new.version is distinct from old.version
    or new.deck_id is distinct from old.deck_id
    or new.change_note is distinct from old.change_note
    or new.published_at is distinct from old.published_at
  ) then
    raise exception 'deck version % is published and cannot change', old.id using errcode = 'check_violation';
  end if;
  return new;
end
$$;

create trigger rule_deck_versions_keep_published before update on rule_deck_versions
  for each row execute function rule_deck_versions_keep_published();
`,
      { transaction },
    );
  });
};

export const down: Migration = async ({ context: { sequelize } }) => {
  await sequelize.query(`
drop trigger if exists rule_deck_versions_keep_published on rule_deck_versions;
drop function if exists rule_deck_versions_keep_published();
drop index if exists rule_deck_versions_deck_idx;
drop index if exists rule_deck_versions_one_draft_idx;
drop index if exists rule_decks_one_team_default_idx;
alter table rule_decks drop column if exists team_default;
`);
};
