// Fixtures of the waiver, report, SARIF and CI tests: a team whose default deck runs
// only device.implausible-size (every other rule switched off, so new rules cannot
// change these results), and an invented block, the Heron bit-line column, in
// variants that change exactly one thing.
//
// device.implausible-size flags a cell once, anchored at its first MOSFET wider than
// the deck's largest plausible width (1 mm by default, a rule of thumb the rule
// states), measuring that width against 1 mm: a bigger width is worse.

import { RuleDeck, RuleDeckVersion, Block, type Team } from '../../server/db/models';
import { deckWithOnly } from './decks-fixtures';

export const SIZE_RULE = 'device.implausible-size';

export interface HeronOptions {
  /** Width of hcol_pre's first pull-down in µm (2000 = 2 mm, flagged). */
  preWidth?: number;
  /** Name of hcol_pre's second oversized pull-down. */
  secondName?: string;
}

/**
 * hcol_pre: a precharge cell with two oversized pull-downs (one finding, devices mn1 and
 * mn2, measured = mn1's width); hcol_drv: a driver with one oversized pull-down,
 * instantiated twice. Widths are in µm (SPICE `u` suffix).
 */
export function heronColumn(options: HeronOptions = {}): string {
  const w = options.preWidth ?? 2000;
  const second = options.secondName ?? 'mn2';
  return [
    '* Heron bit-line column, invented for the waiver tests',
    '.subckt hcol_pre bl blb pre vdd vss',
    'mp1 bl pre vdd vdd pch w=1u l=0.25u',
    `mn1 bl pre vss vss nch w=${w}u l=0.25u`,
    `${second} blb pre vss vss nch w=2000u l=0.25u`,
    '.ends',
    '.subckt hcol_drv a y vdd vss',
    'mp1 y a vdd vdd pch w=1u l=0.25u',
    'mn1 y a vss vss nch w=2000u l=0.25u',
    '.ends',
    '.subckt hcol_top a pre bl blb vdd vss',
    'x1 bl blb pre vdd vss hcol_pre',
    'x2 a y1 vdd vss hcol_drv',
    'x3 a y2 vdd vss hcol_drv',
    '.ends',
    '',
  ].join('\n');
}

/** A clean variant: no device beyond the plausible sizes. */
export function heronColumnClean(): string {
  return heronColumn().replace(/w=2000u/g, 'w=2u');
}

/** The team's default deck: the built-in one with only the size rule on. */
export async function sizeOnlyTeamDeck(team: Team) {
  const deck = await RuleDeck.create({ teamId: team.id, name: `Size deck of ${team.name}`, description: '', defaultVersionId: null, teamDefault: true });
  const version = await RuleDeckVersion.create({
    deckId: deck.id,
    version: 1,
    state: 'published',
    content: { ...deckWithOnly([SIZE_RULE]), name: deck.name },
    changeNote: 'Only the size rule, for the waiver tests.',
    createdBy: null,
    publishedBy: null,
    publishedAt: new Date(),
    parentVersionId: null,
  });
  deck.defaultVersionId = version.id;
  await deck.save();
  return { deck, version };
}

export async function heronBlock(team: Team, name = 'heron-column') {
  return Block.create({ teamId: team.id, name, createdBy: null });
}

/** The column plus hcol_sense, a sense stage nobody instantiates (so it is checked as a root), its pull-down 5 mm wide. */
export function heronWithSense(options: HeronOptions = {}): string {
  return heronColumn(options) + ['.subckt hcol_sense a y vdd vss', 'mp1 y a vdd vdd pch w=1u l=0.25u', 'mn1 y a vss vss nch w=5000u l=0.25u', '.ends', ''].join('\n');
}

/** 1-based line of the first line of `text` that starts with `prefix` after the line starting `.subckt <cell>`. */
export function lineOf(text: string, cell: string, prefix: string): number {
  const lines = text.split('\n');
  const start = lines.findIndex((l) => l.startsWith(`.subckt ${cell} `));
  const at = lines.findIndex((l, i) => i > start && l.startsWith(prefix));
  if (start < 0 || at < 0) throw new Error(`no ${prefix} in ${cell}`);
  return at + 1;
}
