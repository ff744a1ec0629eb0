import type { DeckVersionSummary } from '../../../shared/api/decks';

/** Draft or published, and whether new runs of the deck use it: a word and a shape, never colour alone. */
export function VersionState({ version }: { version: Pick<DeckVersionSummary, 'state' | 'isDeckDefault'> }) {
  return (
    <span className="inline-flex flex-wrap items-center gap-1.5">
      {version.state === 'draft' ? (
        <span className="inline-flex items-center gap-1 rounded border border-dashed border-copper-400 bg-copper-50 px-1.5 py-0.5 text-xs font-medium text-copper-800">
          <span aria-hidden="true">✎</span> Draft
        </span>
      ) : (
        <span className="inline-flex items-center gap-1 rounded border border-ink-300 bg-ink-50 px-1.5 py-0.5 text-xs font-medium text-ink-800">
          <span aria-hidden="true">■</span> Published
        </span>
      )}
      {version.isDeckDefault && (
        <span className="inline-flex items-center gap-1 rounded border border-well-300 bg-well-50 px-1.5 py-0.5 text-xs font-medium text-well-800">
          <span aria-hidden="true">▶</span> Used by new runs
        </span>
      )}
    </span>
  );
}
