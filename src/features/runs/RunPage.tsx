// One run: what was checked against what, its progress while it is queued or running (the
// page asks again every two seconds), why it failed, or — once finished — its findings beside
// the netlist, its summary by rule and by cell, and its comparison with another run.

import { useQuery } from '@tanstack/react-query';
import { useParams, useSearchParams } from 'react-router';
import type { RunDetail } from '../../../shared/api/runs';
import { Button, ButtonLink } from '../../components/Button';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { PageHeader, Panel } from '../../components/PageHeader';
import { ToneGlyph } from '../../design/severity';
import { isApiError } from '../../lib/api';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDateTime } from '../../lib/format';
import { useCan, useCurrentUser } from '../../lib/session';
import { NotFoundPage } from '../errors/NotFoundPage';
import { RunCompare } from './RunCompare';
import { RunFindings } from './RunFindings';
import { isFinished, runQuery, useCancelRun } from './queries';
import { RunProgressBar, RunStateBadge } from './RunState';
import { RunSummary } from './RunSummary';

const TABS = [
  { id: 'findings', label: 'Findings' },
  { id: 'summary', label: 'By rule and cell' },
  { id: 'compare', label: 'Compare' },
] as const;
type TabId = (typeof TABS)[number]['id'];

function elapsed(run: RunDetail): string | null {
  if (!run.startedAt || !run.finishedAt) return null;
  const ms = new Date(run.finishedAt).getTime() - new Date(run.startedAt).getTime();
  if (!(ms >= 0)) return null;
  return ms < 1000 ? `${ms} ms` : ms < 120_000 ? `${(ms / 1000).toFixed(1)} s` : `${Math.round(ms / 60_000)} min`;
}

function Tabs({ active, onChange }: { active: TabId; onChange: (tab: TabId) => void }) {
  return (
    <div
      role="tablist"
      aria-label="Run views"
      className="mb-5 flex gap-1 border-b border-ink-200"
      onKeyDown={(e) => {
        const i = TABS.findIndex((t) => t.id === active);
        const next = e.key === 'ArrowRight' ? (i + 1) % TABS.length : e.key === 'ArrowLeft' ? (i + TABS.length - 1) % TABS.length : -1;
        if (next < 0) return;
        e.preventDefault();
        onChange(TABS[next].id);
        document.getElementById(`run-tab-${TABS[next].id}`)?.focus();
      }}
    >
      {TABS.map((t) => (
        <button
          key={t.id}
          id={`run-tab-${t.id}`}
          type="button"
          role="tab"
          aria-selected={t.id === active}
          aria-controls={`run-panel-${t.id}`}
          tabIndex={t.id === active ? 0 : -1}
          onClick={() => onChange(t.id)}
          className={`-mb-px border-b-2 px-3 py-2 text-sm font-medium ${t.id === active ? 'border-well-700 text-well-900' : 'border-transparent text-ink-600 hover:text-ink-900'}`}
        >
          {t.label}
        </button>
      ))}
    </div>
  );
}

function Diagnostics({ run, open }: { run: RunDetail; open: boolean }) {
  if (!run.diagnostics.length) return null;
  const errors = run.diagnostics.filter((d) => d.severity === 'error').length;
  return (
    <details open={open} className="mb-6 rounded-lg border border-ink-200 bg-white px-4 py-3 text-sm shadow-xs">
      <summary className="cursor-pointer font-medium text-ink-900">
        Reading the netlist: {errors} error{errors === 1 ? '' : 's'}, {run.diagnostics.length - errors} warning{run.diagnostics.length - errors === 1 ? '' : 's'}
      </summary>
      <ul className="mt-2 space-y-1.5">
        {run.diagnostics.map((d, i) => (
          <li key={i} className="flex gap-2">
            <ToneGlyph tone={d.severity} size={11} className="mt-1" />
            <span>
              <span className="font-mono text-xs text-ink-700">
                {d.file}:{d.line}:{d.column}
              </span>{' '}
              {d.message}
              {d.hint && <span className="block text-xs text-ink-500">{d.hint}</span>}
            </span>
          </li>
        ))}
      </ul>
    </details>
  );
}

function Facts({ run }: { run: RunDetail }) {
  const s = run.summary;
  const took = elapsed(run);
  const facts: [string, string][] = [
    ['Deck', `${run.deck.name} v${run.deck.version}`],
    ['Submitted', `${formatDateTime(run.createdAt)} by ${run.submitter?.name ?? 'someone no longer in the team'}`],
    ...(run.topCell ? ([['Top cell', run.topCell]] as [string, string][]) : []),
    ...(s ? ([['Checked', `${s.cells} cells, ${s.devices.toLocaleString('en')} devices flattened`]] as [string, string][]) : []),
    ...(took ? ([['Took', took]] as [string, string][]) : []),
    ['Files', `${run.files.length}`],
  ];
  return (
    <dl className="grid grid-cols-2 gap-x-6 gap-y-2 text-sm md:grid-cols-3 xl:grid-cols-6">
      {facts.map(([k, v]) => (
        <div key={k}>
          <dt className="text-xs font-medium text-ink-500">{k}</dt>
          <dd className="mt-0.5 text-ink-900">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

function Counts({ run }: { run: RunDetail }) {
  const s = run.summary;
  if (!s) return null;
  const items = [
    { tone: 'error' as const, n: s.errors, word: s.errors === 1 ? 'error' : 'errors', filter: 'error' },
    { tone: 'warning' as const, n: s.warnings, word: s.warnings === 1 ? 'warning' : 'warnings', filter: 'warning' },
    { tone: 'info' as const, n: s.infos, word: s.infos === 1 ? 'info' : 'infos', filter: 'info' },
  ];
  return (
    <ul className="flex flex-wrap gap-3" aria-label="Findings by severity">
      {items.map((i) => (
        <li key={i.tone}>
          <ButtonLink to={`?tab=findings&severity=${i.filter}`} size="sm" className="gap-1.5">
            <ToneGlyph tone={i.tone} size={12} />
            <span className="font-semibold tabular-nums">{i.n}</span> {i.word}
          </ButtonLink>
        </li>
      ))}
    </ul>
  );
}

export function RunPage() {
  const { runId = '' } = useParams();
  const run = useQuery(runQuery(runId));
  const [params, setParams] = useSearchParams();
  const user = useCurrentUser();
  const mayCancel = useCan('run.cancel');
  const cancel = useCancelRun(runId);
  useDocumentTitle(run.data ? `Run of ${run.data.block.name}` : 'Run');

  if (run.isPending) return <Loading label="Loading the run…" />;
  if (run.isError) {
    if (isApiError(run.error) && (run.error.status === 404 || run.error.code === 'validation')) return <NotFoundPage what="run" />;
    return <ErrorNotice error={run.error} title="Could not load the run" />;
  }
  const r = run.data;
  const tab = (TABS.find((t) => t.id === params.get('tab'))?.id ?? 'findings') as TabId;
  const canCancel = mayCancel && !isFinished(r.state) && (user.roles.includes('admin') || r.submitter?.id === user.id);

  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Blocks', to: '/blocks' }, { label: r.block.name, to: `/blocks/${encodeURIComponent(r.block.id)}` }, { label: `Run ${formatDateTime(r.createdAt)}` }]}
        title={
          <span className="inline-flex flex-wrap items-center gap-3">
            <span>
              Run of <span className="font-mono">{r.block.name}</span>
            </span>
            <RunStateBadge state={r.state} />
          </span>
        }
        description={r.note || undefined}
        actions={
          <>
            {canCancel && (
              <Button variant="danger" busy={cancel.isPending} onClick={() => cancel.mutate()}>
                Cancel run
              </Button>
            )}
            {r.state === 'succeeded' && <ButtonLink to={`/runs/${encodeURIComponent(r.id)}/report`}>Review report</ButtonLink>}
          </>
        }
      />
      {cancel.isError && <ErrorNotice error={cancel.error} title="Could not cancel the run" className="mb-4" />}
      <Panel className="mb-6 space-y-4 p-4">
        <Facts run={r} />
        {r.state === 'succeeded' && <Counts run={r} />}
        {!isFinished(r.state) && <RunProgressBar run={r} />}
      </Panel>

      {r.state === 'failed' && (
        <Notice tone="error" title="The check did not finish" className="mb-6">
          <p className="whitespace-pre-wrap">{r.error ?? 'No reason was recorded.'}</p>
        </Notice>
      )}
      <Diagnostics run={r} open={r.state === 'failed'} />

      {r.state === 'succeeded' ? (
        <>
          <Tabs active={tab} onChange={(t) =>
              setParams(
                (p) => {
                  const next = new URLSearchParams(p);
                  next.set('tab', t);
                  return next;
                },
                { replace: true },
              )
            } />
          <div id={`run-panel-${tab}`} role="tabpanel" aria-labelledby={`run-tab-${tab}`}>
            {tab === 'findings' && <RunFindings run={r} />}
            {tab === 'summary' &&
              (r.breakdown ? (
                <RunSummary runId={r.id} breakdown={r.breakdown} />
              ) : (
                <Notice tone="info" title="No summary">This run has no breakdown by rule and cell.</Notice>
              ))}
            {tab === 'compare' && <RunCompare run={r} />}
          </div>
        </>
      ) : r.state === 'cancelled' ? (
        <EmptyState title="This run was cancelled" illustration="well" steps={['Submit the netlist again from the block’s page when you want it checked.']}>
          It stopped before writing findings; nothing of it is kept but this record.
        </EmptyState>
      ) : r.state === 'failed' ? null : (
        <EmptyState
          title={r.state === 'queued' ? 'Waiting for a worker' : 'Checking'}
          illustration="well"
          steps={['This page follows the run by itself; you may also leave and come back.', 'When it finishes, its findings appear here beside the netlist lines they point at.']}
        >
          The run is {r.state}. {r.progress?.label ?? ''}
        </EmptyState>
      )}
    </>
  );
}
