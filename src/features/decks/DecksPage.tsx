import { useParams } from 'react-router';
import { EmptyState } from '../../components/EmptyState';
import { PageHeader } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';
import { useCan } from '../../lib/session';

export function DecksPage() {
  useDocumentTitle('Rule decks');
  const canEdit = useCan('deck.edit');
  return (
    <>
      <PageHeader
        title="Rule decks"
        description="A rule deck is the set of rules your team checks against, with their severities and thresholds, process corners and naming of clocks and supplies."
      />
      <EmptyState
        title="No rule decks listed yet"
        illustration="deck"
        steps={
          canEdit
            ? ['Start a deck from Keepwell’s default rules, or import an exported deck file.', 'Tune thresholds and corners in a draft, then publish it as a numbered version that runs can use.']
            : ['Your methodology owners create and publish the team’s decks.', 'Published versions appear here; every run records which version it was checked against.']
        }
      >
        Your team’s decks will be listed here with their published versions and the draft being prepared.
      </EmptyState>
    </>
  );
}

export function DeckPage() {
  const { deckId = '' } = useParams();
  useDocumentTitle('Rule deck');
  return (
    <>
      <PageHeader crumbs={[{ label: 'Rule decks', to: '/decks' }, { label: 'Deck' }]} title="Rule deck" meta={<span className="font-mono text-xs">{deckId}</span>} />
      <EmptyState
        title="Deck details are not available here yet"
        illustration="deck"
        steps={['Choose a version to see its rules, thresholds and corners.', 'Methodology owners open the draft to change it and publish it as the next version.']}
      >
        This page will show the deck’s description, its history of versions with their change notes, and which version new runs use by default.
      </EmptyState>
    </>
  );
}

export function DeckVersionPage() {
  const { deckId = '', versionId = '' } = useParams();
  useDocumentTitle('Deck version');
  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Rule decks', to: '/decks' }, { label: 'Deck', to: `/decks/${encodeURIComponent(deckId)}` }, { label: 'Version' }]}
        title="Deck version"
        meta={<span className="font-mono text-xs">{versionId}</span>}
      />
      <EmptyState
        title="Version contents are not available here yet"
        illustration="deck"
        steps={['Read each rule’s severity and parameters, with their units and allowed ranges.', 'Compare the version with its parent to see what changed and why.']}
      >
        This page will show one version of the deck: every rule with its setting, the corners, the clock, supply and device naming, and who published it when.
      </EmptyState>
    </>
  );
}
