// The review report of one run, laid out to be read on screen and printed for the
// review meeting: the run and its deck version with the publish note, counts by
// severity and status, every open error, every lapsed waiver, every waiver with its
// justification, people and dates. The PDF, CSV and SARIF come from the API.

import { useQuery } from '@tanstack/react-query';
import { useParams } from 'react-router';
import type { ReviewReport, StatusCounts } from '../../../shared/api/reports';
import type { StoredFinding } from '../../../shared/api/runs';
import { WAIVER_SCOPE_LABELS } from '../../../shared/api/waivers';
import { Button, buttonClass } from '../../components/Button';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { PageHeader } from '../../components/PageHeader';
import { ToneBadge } from '../../design/severity';
import { isApiError } from '../../lib/api';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate, formatDateTime } from '../../lib/format';
import { formatQuantity } from '../findings/quantity';
import { FINDING_STATUS_LABELS, FindingStatusBadge, lastDay, StandingBadge } from '../waivers/WaiverStatus';
import { reviewReportQuery } from './queries';

const STATUS_ORDER = ['open', 'waiver-lapsed', 'waiver-requested', 'waived'] as const;
const total = (c: StatusCounts) => STATUS_ORDER.reduce((n, s) => n + c[s], 0);

function Counts({ report }: { report: ReviewReport }) {
  const rows = [
    ['Errors', report.counts.bySeverity.error],
    ['Warnings', report.counts.bySeverity.warning],
    ['Information', report.counts.bySeverity.info],
    ['All findings', report.counts.total],
  ] as const;
  return (
    <table className="w-full max-w-3xl border-collapse text-sm" aria-label="Findings by severity and status">
      <thead>
        <tr className="border-b border-ink-300 text-left text-xs uppercase tracking-wide text-ink-600">
          <th className="py-1.5 pr-4 font-semibold">Severity</th>
          {STATUS_ORDER.map((s) => (
            <th key={s} className="py-1.5 pr-4 text-right font-semibold">
              {FINDING_STATUS_LABELS[s]}
            </th>
          ))}
          <th className="py-1.5 text-right font-semibold">Total</th>
        </tr>
      </thead>
      <tbody>
        {rows.map(([label, c]) => (
          <tr key={label} className={`border-b border-ink-200 ${label === 'All findings' ? 'font-semibold' : ''}`}>
            <th scope="row" className="py-1.5 pr-4 text-left font-medium text-ink-800">
              {label}
            </th>
            {STATUS_ORDER.map((s) => (
              <td key={s} className="py-1.5 pr-4 text-right tabular-nums">
                {c[s]}
              </td>
            ))}
            <td className="py-1.5 text-right tabular-nums">{total(c)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function FindingRows({ findings, label }: { findings: StoredFinding[]; label: string }) {
  return (
    <table className="w-full border-collapse text-sm" aria-label={label}>
      <thead>
        <tr className="border-b border-ink-300 text-left text-xs uppercase tracking-wide text-ink-600">
          <th className="py-1.5 pr-3 font-semibold">Where</th>
          <th className="py-1.5 pr-3 font-semibold">Rule and cell</th>
          <th className="py-1.5 pr-3 font-semibold">Finding</th>
          <th className="py-1.5 font-semibold">Measured</th>
        </tr>
      </thead>
      <tbody>
        {findings.map((f) => (
          <tr key={f.id} className="break-inside-avoid border-b border-ink-200 align-top">
            <td className="py-1.5 pr-3 font-mono text-xs whitespace-nowrap">
              {f.file}:{f.line}:{f.column}
            </td>
            <td className="py-1.5 pr-3">
              <span className="font-mono text-xs">{f.ruleId}</span>
              <span className="block font-mono text-xs text-ink-600">
                {f.cell} ×{f.instances}
              </span>
            </td>
            <td className="py-1.5 pr-3">
              {f.message}
              {f.status === 'waiver-lapsed' && f.waiver?.reason && <span className="mt-0.5 block text-xs font-medium text-ink-900">Lapsed: {f.waiver.reason}</span>}
            </td>
            <td className="py-1.5 tabular-nums whitespace-nowrap">
              {formatQuantity(f.measured)}
              {f.limit && <span className="block text-xs text-ink-600">limit {formatQuantity(f.limit)}</span>}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function Report({ report }: { report: ReviewReport }) {
  const api = `/api/runs/${encodeURIComponent(report.run.id)}`;
  return (
    <article className="space-y-6 print:space-y-4" aria-label="Review report">
      <div className="kw-no-print flex flex-wrap gap-2">
        <Button variant="primary" onClick={() => window.print()}>
          Print
        </Button>
        <a className={buttonClass()} href={`${api}/report.pdf`} download>
          PDF
        </a>
        <a className={buttonClass()} href={`${api}/findings.csv`} download>
          Findings as CSV
        </a>
        <a className={buttonClass()} href={`${api}/sarif`} download>
          SARIF
        </a>
      </div>

      <dl className="grid max-w-4xl grid-cols-[10rem_1fr] gap-x-4 gap-y-1 text-sm">
        <dt className="text-ink-500">Block</dt>
        <dd className="font-medium text-ink-900">{report.run.block.name}</dd>
        <dt className="text-ink-500">Run</dt>
        <dd className="font-mono text-xs">{report.run.id}</dd>
        <dt className="text-ink-500">Submitted</dt>
        <dd>
          {formatDateTime(report.run.createdAt)}
          {report.run.submitter ? ` by ${report.run.submitter.name}` : ''}
        </dd>
        {report.run.note && (
          <>
            <dt className="text-ink-500">Note</dt>
            <dd>{report.run.note}</dd>
          </>
        )}
        <dt className="text-ink-500">Netlist files</dt>
        <dd className="font-mono text-xs">{report.run.files.map((f) => f.path).join(', ')}</dd>
        <dt className="text-ink-500">Rule deck</dt>
        <dd>
          {report.deck.name}, version {report.deck.version} ({report.deck.state}
          {report.deck.publishedAt ? `, published ${formatDate(report.deck.publishedAt)}${report.deck.publishedBy ? ` by ${report.deck.publishedBy.name}` : ''}` : ''})
        </dd>
        <dt className="text-ink-500">Publish note</dt>
        <dd className="whitespace-pre-wrap">{report.deck.publishNote || '—'}</dd>
        <dt className="text-ink-500">Generated</dt>
        <dd>{formatDateTime(report.generatedAt)}</dd>
      </dl>

      <Notice tone="info">{report.caution}</Notice>

      <section aria-labelledby="report-counts">
        <h2 id="report-counts" className="mb-2 text-base font-semibold text-ink-900">
          Findings by severity and status
        </h2>
        <Counts report={report} />
      </section>

      <section aria-labelledby="report-open" className="break-before-auto">
        <h2 id="report-open" className="mb-2 text-base font-semibold text-ink-900">
          Open errors ({report.openErrorsTotal})
        </h2>
        {report.openErrors.length === 0 ? (
          <p className="text-sm text-ink-600">No open error: every error-severity finding is waived or awaiting a decision.</p>
        ) : (
          <FindingRows findings={report.openErrors} label="Open errors" />
        )}
        {report.openErrorsTotal > report.openErrors.length && (
          <p className="mt-1 text-xs text-ink-600">The first {report.openErrors.length} are listed; the CSV holds every finding.</p>
        )}
      </section>

      <section aria-labelledby="report-lapsed">
        <h2 id="report-lapsed" className="mb-2 text-base font-semibold text-ink-900">
          Lapsed waivers ({report.lapsedTotal})
        </h2>
        {report.lapsed.length === 0 ? <p className="text-sm text-ink-600">No waiver of this run has lapsed.</p> : <FindingRows findings={report.lapsed} label="Lapsed waivers" />}
      </section>

      <section aria-labelledby="report-waivers">
        <h2 id="report-waivers" className="mb-2 text-base font-semibold text-ink-900">
          Waivers ({report.waivers.length})
        </h2>
        {report.waivers.length === 0 && <p className="text-sm text-ink-600">No waiver concerns this run’s findings.</p>}
        <ul className="space-y-3" aria-label="Waivers">
          {report.waivers.map((w) => (
            <li key={w.id} className="break-inside-avoid rounded-md border border-ink-200 bg-white p-3 text-sm print:border-ink-400">
              <div className="flex flex-wrap items-center gap-2">
                <FindingStatusBadge status={w.statusInRun} />
                <StandingBadge standing={w.standing} />
                <span className="font-mono text-xs">{w.ruleId}</span>
                <span>in</span>
                <span className="font-mono text-xs">{w.cell ?? 'every cell'}</span>
                <span className="text-ink-600">
                  — {WAIVER_SCOPE_LABELS[w.scope].label.toLowerCase()}, {w.findings} finding{w.findings === 1 ? '' : 's'} of this run
                </span>
              </div>
              <p className="mt-1.5 whitespace-pre-wrap text-ink-900">{w.justification}</p>
              <dl className="mt-1.5 grid grid-cols-[8rem_1fr] gap-x-3 text-xs text-ink-700">
                <dt>Requested</dt>
                <dd>
                  {formatDate(w.createdAt)} by {w.requester?.name ?? '—'}
                </dd>
                {w.decidedAt && (
                  <>
                    <dt>{w.state === 'rejected' ? 'Rejected' : 'Approved'}</dt>
                    <dd>
                      {formatDate(w.decidedAt)} by {w.decider?.name ?? '—'}
                      {w.decisionComment ? `: ${w.decisionComment}` : ''}
                    </dd>
                  </>
                )}
                <dt>Holds through</dt>
                <dd>{lastDay(w.expiresAt) ?? 'no expiry'}</dd>
                {w.bound && (
                  <>
                    <dt>Lapses when</dt>
                    <dd>
                      measured {w.bound.sense === 'max' ? 'above' : 'below'} {formatQuantity(w.bound)}
                    </dd>
                  </>
                )}
              </dl>
            </li>
          ))}
        </ul>
      </section>
      <p className="text-xs text-ink-600">
        <ToneBadge tone="info" label="Caution" /> {report.caution}
      </p>
    </article>
  );
}

export function ReviewReportPage() {
  const { runId = '' } = useParams();
  const report = useQuery(reviewReportQuery(runId));
  useDocumentTitle(report.data ? `Review report: ${report.data.run.block.name}` : 'Review report');
  const notFinished = isApiError(report.error, 'conflict');
  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Blocks', to: '/blocks' }, ...(report.data ? [{ label: report.data.run.block.name, to: `/blocks/${report.data.run.block.id}` }] : []), { label: 'Run', to: `/runs/${encodeURIComponent(runId)}` }, { label: 'Review report' }]}
        title={report.data ? `Review report: ${report.data.run.block.name}` : 'Review report'}
      />
      {report.isPending && <Loading label="Gathering the report…" />}
      {notFinished && (
        <EmptyState
          title="No report for this run yet"
          illustration="list"
          steps={['Wait for the run to finish.', 'Open the report from the run’s page to read, print or download it for the review meeting.']}
        >
          The review report gathers one finished run’s findings, the waivers that apply to them with their justifications, and the deck version used, in a form to print or share.
        </EmptyState>
      )}
      {report.isError && !notFinished && <ErrorNotice error={report.error} title="Could not load the report" />}
      {report.data && <Report report={report.data} />}
    </>
  );
}
