// "What would change": the team's newest netlist checked with this draft and with the
// version it started from; findings that appear, disappear or change severity.

import type { DeckPreview, DeckVersion } from '../../../shared/api/decks';
import type { Finding } from '../../../shared/findings';
import { REVIEW_CAUTION } from '../../../shared/findings';
import { Button } from '../../components/Button';
import { ErrorNotice, Notice } from '../../components/Notice';
import { Panel } from '../../components/PageHeader';
import { ToneBadge } from '../../design/severity';
import { isApiError } from '../../lib/api';
import { formatDateTime } from '../../lib/format';
import { usePreview } from './queries';

function FindingRows({ findings, before }: { findings: Finding[]; before?: Finding[] }) {
  return (
    <ul className="divide-y divide-ink-100">
      {findings.map((f, i) => (
        <li key={f.fingerprint} className="grid gap-1 py-2 text-sm sm:grid-cols-[9rem_minmax(0,1fr)]">
          <span className="flex flex-wrap items-center gap-1">
            {before && (
              <>
                <ToneBadge tone={before[i].severity} />
                <span aria-hidden="true">→</span>
                <span className="sr-only">now</span>
              </>
            )}
            <ToneBadge tone={f.severity} />
          </span>
          <span className="min-w-0">
            <span className="font-mono text-xs text-ink-500">
              {f.ruleId} · {f.cell} · {f.file}:{f.line}
            </span>
            <span className="block text-ink-800">{f.message}</span>
          </span>
        </li>
      ))}
    </ul>
  );
}

function Bucket({ title, count, listed, children }: { title: string; count: number; listed: number; children: React.ReactNode }) {
  return (
    <section aria-label={title} className="mt-4">
      <h3 className="text-sm font-semibold text-ink-900">
        {title} <span className="font-normal tabular-nums text-ink-500">({count})</span>
      </h3>
      {count === 0 ? <p className="py-2 text-sm text-ink-500">None.</p> : children}
      {count > listed && <p className="text-xs text-ink-500">The first {listed} are listed.</p>}
    </section>
  );
}

function PreviewResult({ result }: { result: DeckPreview }) {
  const { counts } = result;
  return (
    <div>
      <p className="text-sm text-ink-700">
        Block <span className="font-mono">{result.netlist.blockName}</span>, upload of {formatDateTime(result.netlist.createdAt)} ({result.netlist.files} file
        {result.netlist.files === 1 ? '' : 's'}): {counts.base} finding{counts.base === 1 ? '' : 's'} with {result.base.label}, {counts.draft} with {result.draft.label}.
        {result.parseErrors > 0 && ` The netlist has ${result.parseErrors} reading error${result.parseErrors === 1 ? '' : 's'}; their lines were skipped.`}
      </p>
      <Bucket title="New findings" count={counts.added} listed={result.added.length}>
        <FindingRows findings={result.added} />
      </Bucket>
      <Bucket title="Findings that go away" count={counts.removed} listed={result.removed.length}>
        <FindingRows findings={result.removed} />
      </Bucket>
      <Bucket title="Findings that change severity" count={counts.changed} listed={result.changed.length}>
        <FindingRows findings={result.changed.map((c) => c.after)} before={result.changed.map((c) => c.before)} />
      </Bucket>
      <p className="mt-4 text-xs text-ink-500">{REVIEW_CAUTION}</p>
    </div>
  );
}

export function PreviewPanel({ version }: { version: DeckVersion }) {
  const preview = usePreview(version);
  const baseLabel = version.parentVersion ? `version ${version.parentVersion}` : 'Keepwell’s built-in deck';
  return (
    <Panel className="p-4">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <p className="max-w-2xl text-sm text-ink-600">
          Checks your team’s newest uploaded netlist with this {version.state === 'draft' ? 'draft' : 'version'} and with {baseLabel}, and lists the findings that would appear,
          go away or change severity. Findings are matched by their fingerprint, so moved lines do not count as changes.
        </p>
        <Button variant="primary" busy={preview.isPending} onClick={() => preview.mutate()}>
          {preview.data ? 'Run the preview again' : 'Run the preview'}
        </Button>
      </div>
      <div className="mt-4" aria-live="polite">
        {preview.isPending && <p className="text-sm text-ink-500">Checking the netlist twice…</p>}
        {preview.isError &&
          (isApiError(preview.error, 'no-netlist') ? (
            <Notice tone="info" title="No netlist to preview on yet">
              The preview uses the newest netlist uploaded by your team. Once a designer submits a block for checking, it appears here.
            </Notice>
          ) : (
            <ErrorNotice error={preview.error} title="The preview did not finish" />
          ))}
        {preview.data && !preview.isPending && <PreviewResult result={preview.data} />}
      </div>
    </Panel>
  );
}
