// Rule decks, versions and netlists made straight through the models, for the deck
// tests and the route table: each call makes fresh rows, so a route that changes
// them can be tried once per role.

import crypto from 'node:crypto';
import { defaultDeck } from '../../rules/default-deck';
import type { Deck } from '../../shared/deck';
import { Netlist, NetlistFile, RuleDeck, RuleDeckVersion } from '../../server/db/models';

export interface DeckFixture {
  deck: RuleDeck;
  published: RuleDeckVersion;
  draft: RuleDeckVersion | null;
}

/** A deck with a published version 1 (its default) and, if asked, an open draft 2 started from it. */
export async function makeDeck(teamId: string, options: { draft?: boolean; content?: Deck; name?: string } = {}): Promise<DeckFixture> {
  const name = options.name ?? `deck-${crypto.randomBytes(4).toString('hex')}`;
  const content = options.content ?? { ...defaultDeck(), name };
  const deck = await RuleDeck.create({ teamId, name, description: 'made by a test', defaultVersionId: null });
  const published = await RuleDeckVersion.create({
    deckId: deck.id,
    version: 1,
    state: 'published',
    content,
    changeNote: 'Test fixture.',
    createdBy: null,
    publishedBy: null,
    publishedAt: new Date(),
    parentVersionId: null,
  });
  deck.defaultVersionId = published.id;
  await deck.save();
  const draft = options.draft
    ? await RuleDeckVersion.create({
        deckId: deck.id,
        version: 2,
        state: 'draft',
        content,
        createdBy: null,
        publishedBy: null,
        publishedAt: null,
        parentVersionId: published.id,
      })
    : null;
  return { deck, published, draft };
}

/** The built-in deck with every rule but `ids` switched off, so a test sees only the rules it is about. */
export function deckWithOnly(ids: string[], change: (deck: Deck) => void = () => {}): Deck {
  const deck = defaultDeck();
  for (const [id, setting] of Object.entries(deck.rules)) setting.enabled = ids.includes(id);
  change(deck);
  return deck;
}

/** Store an upload of `files` (path → text) for a block, as the upload route would. */
export async function makeNetlist(teamId: string, blockId: string, files: Record<string, string>): Promise<Netlist> {
  const entries = Object.entries(files);
  const netlist = await Netlist.create({
    teamId,
    blockId,
    uploadedBy: null,
    fileCount: entries.length,
    totalBytes: entries.reduce((n, [, t]) => n + Buffer.byteLength(t), 0),
  });
  for (const [path, text] of entries) {
    const content = Buffer.from(text, 'utf8');
    await NetlistFile.create({ netlistId: netlist.id, path, sha256: crypto.createHash('sha256').update(content).digest('hex'), size: content.length, content });
  }
  return netlist;
}

/**
 * A CMOS inverter and one transistor 2 µm wide, with explicit sizes in metres. Invented
 * for these tests. The inverter's noise margins are each below VDD/2 by their
 * definition (NMH + NML = VOH − VOL − (VIH − VIL) < VDD, Rabaey et al., Digital Integrated
 * Circuits, 2nd ed., §5.3), so a deck asking for margins of half the supply must flag it.
 */
export const INVERTER_NETLIST = `* test inverter and a wide pull-down (invented for the deck tests)
.subckt tinv a y vdd vss
Mp y a vdd vdd pmos w=2e-6 l=0.25e-6
Mn y a vss vss nmos w=1e-6 l=0.25e-6
.ends tinv
.subckt wide a y vss
Mw y a vss vss nmos w=2e-6 l=0.25e-6
.ends wide
X1 in out vdd vss tinv
X2 in out2 vss wide
.end
`;
