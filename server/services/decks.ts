// Rule decks of a team and their numbered versions.
//
// A version is a draft or published. A published version never changes (this
// service refuses it with 409 `version-published`, and a trigger in the database
// refuses it whatever the code path); editing starts a new draft from it. A deck
// has at most one open draft (a partial unique index): a second "new draft" is a
// 409 `draft-exists` naming the open one, so two owners work on one draft and the
// draft's lockVersion keeps either from losing the other's edit (409 `stale-version`).
// Every change records an audit event in its own transaction.

import { isDeepStrictEqual } from 'node:util';
import { ForeignKeyConstraintError, Op, UniqueConstraintError, type Transaction } from 'sequelize';
import type {
  DeckDetail,
  DeckDiff,
  DeckSummary,
  DeckVersion as DeckVersionView,
  DeckVersionSummary,
  PatchOperation,
} from '../../shared/api/decks';
import type { Deck } from '../../shared/deck';
import { deckSchema } from '../../shared/deck';
import { defaultDeck } from '../../rules/default-deck';
import { ruleRegistry } from '../../rules/registry';
import { validateDeck, type DeckIssue } from '../../rules/validate-deck';
import type { AppContext } from '../context';
import { RuleDeck, RuleDeckVersion, User } from '../db/models';
import { conflict, HttpError, notFound } from '../errors';
import { recordAudit } from './audit';
import { diffDeckContents } from './decks-diff';
import { applyPatch, PatchError } from './decks-patch';

export interface DeckActor {
  id: string;
  teamId: string;
}

// ---- errors -------------------------------------------------------------------

export function invalidDeck(issues: DeckIssue[]): HttpError {
  return new HttpError(
    422,
    'invalid-deck',
    'The deck is not valid.',
    issues.map((i) => ({ path: i.path || '(deck)', message: i.message })),
  );
}

const publishedError = (version: number) =>
  new HttpError(409, 'version-published', `Version ${version} is published and cannot change. Start a new draft from it instead.`);

const staleError = (current: number) =>
  new HttpError(409, 'stale-version', `Someone changed this draft since you loaded it (it is now at edit ${current}). Reload it and apply your change again.`);

// ---- content ------------------------------------------------------------------

/** A deck in its one written form: fields in the schema's order, rules in the registry's order (unknown ids after, alphabetically). */
export function canonicalDeck(content: Deck): Deck {
  const deck = deckSchema.parse(content);
  const rank = new Map(ruleRegistry.map((r, i) => [r.meta.id, i]));
  const ids = Object.keys(deck.rules).sort((a, b) => (rank.get(a) ?? Infinity) - (rank.get(b) ?? Infinity) || a.localeCompare(b));
  return { ...deck, rules: Object.fromEntries(ids.map((id) => [id, deck.rules[id]])) };
}

/** Validate untrusted deck content (an import, an edited draft) or throw 422 with one detail per offending field. */
export function validDeckOrThrow(input: unknown): Deck {
  const result = validateDeck(input);
  if (!result.ok) throw invalidDeck(result.issues);
  return canonicalDeck(result.deck);
}

/** The export file: exactly the Deck that `keepwell check --deck FILE` reads. */
export function exportText(content: Deck): string {
  return JSON.stringify(canonicalDeck(content), null, 2) + '\n';
}

// ---- views --------------------------------------------------------------------

const people = [
  { model: User, as: 'creator', attributes: ['id', 'name'] },
  { model: User, as: 'publisher', attributes: ['id', 'name'] },
  { model: RuleDeckVersion, as: 'parent', attributes: ['id', 'version'] },
];

function person(user: User | null | undefined) {
  return user ? { id: user.id, name: user.name } : null;
}

function versionSummary(v: RuleDeckVersion, deck: RuleDeck): DeckVersionSummary {
  return {
    id: v.id,
    deckId: v.deckId,
    version: v.version,
    state: v.state,
    changeNote: v.changeNote,
    lockVersion: v.lockVersion,
    parentVersionId: v.parentVersionId,
    parentVersion: v.parent?.version ?? null,
    createdBy: person(v.creator),
    createdAt: v.createdAt.toISOString(),
    updatedAt: v.updatedAt.toISOString(),
    publishedBy: person(v.publisher),
    publishedAt: v.publishedAt ? v.publishedAt.toISOString() : null,
    isDeckDefault: deck.defaultVersionId === v.id,
  };
}

function versionView(v: RuleDeckVersion, deck: RuleDeck): DeckVersionView {
  return { ...versionSummary(v, deck), deckName: deck.name, content: canonicalDeck(v.content) };
}

function deckSummary(deck: RuleDeck, versions: RuleDeckVersion[]): DeckSummary {
  const ref = (v: RuleDeckVersion | undefined) => (v ? { id: v.id, version: v.version } : null);
  const published = versions.filter((v) => v.state === 'published').sort((x, y) => y.version - x.version);
  const draft = versions.find((v) => v.state === 'draft');
  return {
    id: deck.id,
    name: deck.name,
    description: deck.description,
    teamDefault: deck.teamDefault,
    defaultVersion: ref(versions.find((v) => v.id === deck.defaultVersionId)),
    latestPublished: ref(published[0]),
    draft: draft ? { id: draft.id, version: draft.version, updatedAt: draft.updatedAt.toISOString() } : null,
    versionCount: versions.length,
    createdAt: deck.createdAt.toISOString(),
    updatedAt: deck.updatedAt.toISOString(),
  };
}

// ---- reading ------------------------------------------------------------------

/** A deck of the caller's team; another team's deck is "not found", never "forbidden". */
export async function getDeck(teamId: string, deckId: string, transaction?: Transaction): Promise<RuleDeck> {
  const deck = await RuleDeck.findOne({ where: { id: deckId, teamId }, transaction });
  if (!deck) throw notFound('Rule deck');
  return deck;
}

export async function getVersion(teamId: string, deckId: string, versionId: string): Promise<{ deck: RuleDeck; version: RuleDeckVersion }> {
  const deck = await getDeck(teamId, deckId);
  const version = await RuleDeckVersion.findOne({ where: { id: versionId, deckId }, include: people });
  if (!version) throw notFound('Deck version');
  return { deck, version };
}

/** A version of any deck of the team, by id alone (diffs across decks, runs). */
export async function getTeamVersion(teamId: string, versionId: string): Promise<{ deck: RuleDeck; version: RuleDeckVersion }> {
  const version = await RuleDeckVersion.findOne({ where: { id: versionId }, include: [{ model: RuleDeck, as: 'deck', where: { teamId }, required: true }] });
  if (!version || !version.deck) throw notFound('Deck version');
  return { deck: version.deck, version };
}

export async function listDecks(teamId: string): Promise<DeckSummary[]> {
  const decks = await RuleDeck.findAll({
    where: { teamId },
    include: [{ model: RuleDeckVersion, as: 'versions', attributes: ['id', 'version', 'state', 'updatedAt'] }],
    order: [['name', 'ASC']],
  });
  return decks.map((d) => deckSummary(d, d.versions ?? []));
}

export async function deckDetail(teamId: string, deckId: string): Promise<DeckDetail> {
  const deck = await getDeck(teamId, deckId);
  const versions = await RuleDeckVersion.findAll({
    where: { deckId },
    attributes: { exclude: ['content'] },
    include: people,
    order: [['version', 'DESC']],
  });
  return { ...deckSummary(deck, versions), versions: versions.map((v) => versionSummary(v, deck)) };
}

export async function versionDetail(teamId: string, deckId: string, versionId: string): Promise<DeckVersionView> {
  const { deck, version } = await getVersion(teamId, deckId, versionId);
  return versionView(version, deck);
}

export async function exportVersion(teamId: string, deckId: string, versionId: string): Promise<{ fileName: string; text: string }> {
  const { deck, version } = await getVersion(teamId, deckId, versionId);
  const stem = deck.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'deck';
  return { fileName: `${stem}-v${version.version}${version.state === 'draft' ? '-draft' : ''}.json`, text: exportText(version.content) };
}

export async function diffVersions(teamId: string, fromId: string, toId: string): Promise<DeckDiff> {
  const [from, to] = await Promise.all([getTeamVersion(teamId, fromId), getTeamVersion(teamId, toId)]);
  const ref = ({ deck, version }: { deck: RuleDeck; version: RuleDeckVersion }) => ({ id: version.id, version: version.version, deckId: deck.id, deckName: deck.name });
  return { from: ref(from), to: ref(to), ...diffDeckContents(canonicalDeck(from.version.content), canonicalDeck(to.version.content)) };
}

/**
 * The version a run uses: the one it names, which must be a published version of the
 * team's, or else the team default deck's default version (null when no deck of the
 * team has a published version).
 */
export async function versionForRun(teamId: string, versionId?: string | null): Promise<RuleDeckVersion | null> {
  if (versionId) {
    const { version } = await getTeamVersion(teamId, versionId);
    if (version.state !== 'published') throw new HttpError(409, 'version-not-published', `Version ${version.version} is a draft; runs use published versions only.`);
    return version;
  }
  // The team default deck first; while it has nothing published, the oldest deck that has.
  const deck = await RuleDeck.findOne({
    where: { teamId, defaultVersionId: { [Op.ne]: null } },
    order: [
      ['teamDefault', 'DESC'],
      ['createdAt', 'ASC'],
    ],
  });
  if (!deck?.defaultVersionId) return null;
  return RuleDeckVersion.findOne({ where: { id: deck.defaultVersionId, state: 'published' } });
}

// ---- changing -----------------------------------------------------------------

async function nextVersionNumber(deckId: string, transaction: Transaction): Promise<number> {
  const max = (await RuleDeckVersion.max('version', { where: { deckId }, transaction })) as number | null;
  return (max ?? 0) + 1;
}

/** A new deck whose version 1 is a draft: the built-in deck, or an imported deck file. */
export async function createDeck(
  ctx: AppContext,
  actor: DeckActor,
  input: { name: string; description: string; content?: unknown },
): Promise<DeckDetail> {
  const imported = input.content !== undefined;
  const content = imported ? validDeckOrThrow(input.content) : canonicalDeck({ ...defaultDeck(), name: input.name });
  try {
    const deckId = await ctx.sequelize.transaction(async (transaction) => {
      const isFirst = (await RuleDeck.count({ where: { teamId: actor.teamId }, transaction })) === 0;
      const deck = await RuleDeck.create(
        { teamId: actor.teamId, name: input.name, description: input.description, defaultVersionId: null, teamDefault: isFirst },
        { transaction },
      );
      const version = await RuleDeckVersion.create(
        { deckId: deck.id, version: 1, state: 'draft', content, createdBy: actor.id, publishedBy: null, publishedAt: null, parentVersionId: null },
        { transaction },
      );
      await recordAudit(
        {
          teamId: actor.teamId,
          actorId: actor.id,
          action: 'deck.create',
          subjectType: 'rule-deck',
          subjectId: deck.id,
          detail: { name: deck.name, source: imported ? 'import' : 'built-in', draftVersionId: version.id },
        },
        transaction,
      );
      return deck.id;
    });
    return deckDetail(actor.teamId, deckId);
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw conflict(`A rule deck named "${input.name}" already exists.`);
    throw err;
  }
}

async function openDraftConflict(deckId: string, transaction?: Transaction): Promise<HttpError> {
  const open = await RuleDeckVersion.findOne({ where: { deckId, state: 'draft' }, attributes: ['id', 'version'], transaction });
  return new HttpError(
    409,
    'draft-exists',
    open ? `Version ${open.version} is already an open draft of this deck; continue editing it, or discard it first.` : 'This deck already has an open draft.',
    open ? [{ path: 'draftId', message: open.id }] : undefined,
  );
}

/** Start the deck's draft from one of its published versions (default: the newest). */
export async function createDraft(ctx: AppContext, actor: DeckActor, deckId: string, fromVersionId?: string): Promise<DeckVersionView> {
  await getDeck(actor.teamId, deckId);
  try {
    const id = await ctx.sequelize.transaction(async (transaction) => {
      if (await RuleDeckVersion.count({ where: { deckId, state: 'draft' }, transaction })) throw await openDraftConflict(deckId, transaction);
      const source = fromVersionId
        ? await RuleDeckVersion.findOne({ where: { id: fromVersionId, deckId }, transaction })
        : await RuleDeckVersion.findOne({ where: { deckId, state: 'published' }, order: [['version', 'DESC']], transaction });
      if (!source) throw fromVersionId ? notFound('Deck version') : conflict('This deck has no published version to start a draft from.');
      if (source.state !== 'published') throw new HttpError(409, 'version-not-published', 'A draft starts from a published version.');
      const draft = await RuleDeckVersion.create(
        {
          deckId,
          version: await nextVersionNumber(deckId, transaction),
          state: 'draft',
          content: canonicalDeck(source.content),
          createdBy: actor.id,
          publishedBy: null,
          publishedAt: null,
          parentVersionId: source.id,
        },
        { transaction },
      );
      await recordAudit(
        {
          teamId: actor.teamId,
          actorId: actor.id,
          action: 'deck.draft',
          subjectType: 'rule-deck-version',
          subjectId: draft.id,
          detail: { deckId, version: draft.version, fromVersion: source.version },
        },
        transaction,
      );
      return draft.id;
    });
    return versionDetail(actor.teamId, deckId, id);
  } catch (err) {
    // Two owners pressing "new draft" at once: the index lets one through.
    if (err instanceof UniqueConstraintError) throw await openDraftConflict(deckId);
    throw err;
  }
}

/**
 * Change a draft under a row lock: the caller's lockVersion must be the current one,
 * the result must be a valid deck, and one audit event lists the changed fields.
 */
async function changeDraft(
  ctx: AppContext,
  actor: DeckActor,
  deckId: string,
  versionId: string,
  lockVersion: number,
  change: (content: Deck) => Deck,
  detail: Record<string, unknown>,
): Promise<DeckVersionView> {
  const deck = await getDeck(actor.teamId, deckId);
  await ctx.sequelize.transaction(async (transaction) => {
    const version = await RuleDeckVersion.findOne({ where: { id: versionId, deckId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!version) throw notFound('Deck version');
    if (version.state === 'published') throw publishedError(version.version);
    if (version.lockVersion !== lockVersion) throw staleError(version.lockVersion);
    const before = canonicalDeck(version.content);
    const after = change(before);
    if (isDeepStrictEqual(before, after)) return; // nothing changed: no new edit number, no audit event
    const { paths } = diffDeckContents(before, after);
    version.content = after;
    version.changed('content', true);
    await version.save({ transaction });
    await recordAudit(
      {
        teamId: actor.teamId,
        actorId: actor.id,
        action: 'deck.edit',
        subjectType: 'rule-deck-version',
        subjectId: version.id,
        detail: { deckId, version: version.version, lockVersion: version.lockVersion, paths: paths.length ? paths : ['(order of entries)'], ...detail },
      },
      transaction,
    );
  });
  return versionDetail(actor.teamId, deck.id, versionId);
}

/** Apply JSON Patch operations to a draft. A failing operation is a 422 naming its pointer; an invalid result a 422 naming each field. */
export function patchDraft(ctx: AppContext, actor: DeckActor, deckId: string, versionId: string, lockVersion: number, changes: PatchOperation[]) {
  return changeDraft(
    ctx,
    actor,
    deckId,
    versionId,
    lockVersion,
    (content) => {
      let patched: unknown;
      try {
        patched = applyPatch(content, changes);
      } catch (err) {
        if (err instanceof PatchError) throw new HttpError(422, 'invalid-patch', 'A change could not be applied.', [{ path: err.pointer, message: err.message }]);
        throw err;
      }
      return validDeckOrThrow(patched);
    },
    { changes: changes.map((c) => `${c.op} ${c.path}`) },
  );
}

/** Replace a draft's whole content, e.g. with an imported deck file. */
export function replaceDraftContent(ctx: AppContext, actor: DeckActor, deckId: string, versionId: string, lockVersion: number, content: unknown) {
  const valid = validDeckOrThrow(content);
  return changeDraft(ctx, actor, deckId, versionId, lockVersion, () => valid, { source: 'import' });
}

export async function publishDraft(
  ctx: AppContext,
  actor: DeckActor,
  deckId: string,
  versionId: string,
  input: { lockVersion: number; changeNote: string; makeDefault: boolean },
): Promise<DeckVersionView> {
  await getDeck(actor.teamId, deckId);
  await ctx.sequelize.transaction(async (transaction) => {
    const deck = await RuleDeck.findOne({ where: { id: deckId }, transaction, lock: transaction.LOCK.UPDATE });
    const version = await RuleDeckVersion.findOne({ where: { id: versionId, deckId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!deck || !version) throw notFound('Deck version');
    if (version.state === 'published') throw publishedError(version.version);
    if (version.lockVersion !== input.lockVersion) throw staleError(version.lockVersion);
    // Drafts are validated on every edit; this guards against a rule registry that changed since.
    version.content = validDeckOrThrow(version.content);
    version.changed('content', true);
    version.state = 'published';
    version.changeNote = input.changeNote;
    version.publishedAt = new Date();
    version.publishedBy = actor.id;
    await version.save({ transaction });
    const firstPublished = deck.defaultVersionId === null;
    if (input.makeDefault || firstPublished) {
      deck.defaultVersionId = version.id;
      await deck.save({ transaction });
    }
    await recordAudit(
      {
        teamId: actor.teamId,
        actorId: actor.id,
        action: 'deck.publish',
        subjectType: 'rule-deck-version',
        subjectId: version.id,
        detail: { deckId, version: version.version, changeNote: input.changeNote, deckDefault: deck.defaultVersionId === version.id },
      },
      transaction,
    );
  });
  return versionDetail(actor.teamId, deckId, versionId);
}

export async function discardDraft(ctx: AppContext, actor: DeckActor, deckId: string, versionId: string): Promise<void> {
  await getDeck(actor.teamId, deckId);
  try {
    await ctx.sequelize.transaction(async (transaction) => {
      const version = await RuleDeckVersion.findOne({ where: { id: versionId, deckId }, transaction, lock: transaction.LOCK.UPDATE });
      if (!version) throw notFound('Deck version');
      if (version.state === 'published') throw publishedError(version.version);
      await version.destroy({ transaction });
      await recordAudit(
        { teamId: actor.teamId, actorId: actor.id, action: 'deck.discard', subjectType: 'rule-deck-version', subjectId: version.id, detail: { deckId, version: version.version } },
        transaction,
      );
    });
  } catch (err) {
    if (err instanceof ForeignKeyConstraintError) throw conflict('Runs were checked against this draft; it cannot be discarded.');
    throw err;
  }
}

/** Make a published version its deck's default, and that deck the team's default: runs that name no version use it. */
export async function makeTeamDefault(ctx: AppContext, actor: DeckActor, deckId: string, versionId: string): Promise<DeckDetail> {
  await getDeck(actor.teamId, deckId);
  await ctx.sequelize.transaction(async (transaction) => {
    const version = await RuleDeckVersion.findOne({ where: { id: versionId, deckId }, transaction });
    if (!version) throw notFound('Deck version');
    if (version.state !== 'published') throw new HttpError(409, 'version-not-published', 'Only a published version can be the default for runs.');
    // Team rows are locked through their decks so two owners choosing at once take turns.
    await RuleDeck.findAll({ where: { teamId: actor.teamId }, transaction, lock: transaction.LOCK.UPDATE });
    const previous = await RuleDeck.findOne({ where: { teamId: actor.teamId, teamDefault: true }, transaction });
    await RuleDeck.update({ teamDefault: false }, { where: { teamId: actor.teamId, teamDefault: true, id: { [Op.ne]: deckId } }, transaction });
    await RuleDeck.update({ teamDefault: true, defaultVersionId: version.id }, { where: { id: deckId }, transaction });
    await recordAudit(
      {
        teamId: actor.teamId,
        actorId: actor.id,
        action: 'deck.default',
        subjectType: 'rule-deck-version',
        subjectId: version.id,
        detail: { deckId, version: version.version, previousDeckId: previous?.id ?? null },
      },
      transaction,
    );
  });
  return deckDetail(actor.teamId, deckId);
}
