// One waiver: what it covers, the finding it was asked on, the justification, who
// asked, decided or revoked it and when, its full history, and — for a reviewer —
// the decision in one click (mail links lead here).

import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { WAIVER_SCOPE_LABELS, type WaiverDetail } from '../../../shared/api/waivers';
import { REVIEW_CAUTION } from '../../../shared/findings';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { PageHeader, Panel } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate, formatDateTime } from '../../lib/format';
import { useCan, useCurrentUser } from '../../lib/session';
import { formatQuantity } from '../findings/quantity';
import { waiverQuery } from './queries';
import { WaiverDecisionForm, WaiverRevokeForm } from './WaiverForms';
import { lastDay, StandingBadge } from './WaiverStatus';

const ACTIONS: Record<string, string> = {
  'waiver.request': 'Asked for',
  'waiver.grant': 'Waived directly',
  'waiver.approve': 'Approved',
  'waiver.reject': 'Rejected',
  'waiver.revoke': 'Revoked',
  'waiver.withdraw': 'Withdrawn by the requester',
  'waiver.expiry-warning': 'Expiry reminder sent',
};

function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-xs font-medium text-ink-500">{label}</dt>
      <dd className="mt-0.5 text-sm text-ink-900">{children}</dd>
    </div>
  );
}

function WaiverBody({ waiver }: { waiver: WaiverDetail }) {
  const canDecide = useCan('waiver.decide');
  const canRevoke = useCan('waiver.revoke');
  const canRequest = useCan('waiver.request');
  const user = useCurrentUser();
  const ownPendingRequest = waiver.state === 'requested' && canRequest && waiver.requester?.id === user.id;
  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
      <div className="space-y-4">
        <Panel className="p-4">
          <dl className="grid grid-cols-2 gap-x-6 gap-y-3">
            <Fact label="Rule">
              <span className="font-mono text-xs">{waiver.ruleId}</span>
            </Fact>
            <Fact label="Cell">
              <span className="font-mono text-xs">{waiver.cell ?? 'every cell'}</span>
            </Fact>
            <Fact label="Covers">
              {WAIVER_SCOPE_LABELS[waiver.scope].label}
              <span className="block text-xs text-ink-600">{WAIVER_SCOPE_LABELS[waiver.scope].description}</span>
            </Fact>
            <Fact label="Asked in block">{waiver.block?.name ?? '—'}</Fact>
            <Fact label="Holds through">{lastDay(waiver.expiresAt) ?? 'no expiry'}</Fact>
            <Fact label="Lapses when">
              {waiver.bound ? `the measured value is ${waiver.bound.sense === 'max' ? 'above' : 'below'} ${formatQuantity(waiver.bound)}` : 'the circuit changes (no bound on the value)'}
            </Fact>
            <Fact label="Finding when asked">
              {waiver.message || '—'}
              {waiver.measured && <span className="block text-xs text-ink-600">Measured {formatQuantity(waiver.measured)}</span>}
              {waiver.source && (
                <Link className="block text-xs font-medium text-well-700 underline" to={`/runs/${waiver.source.runId}${waiver.source.findingId ? `?finding=${waiver.source.findingId}` : ''}`}>
                  Open the run it was asked on
                </Link>
              )}
            </Fact>
            <Fact label="Devices and nets">
              <span className="font-mono text-xs">{[...waiver.devices, ...waiver.nets].join(', ') || '—'}</span>
            </Fact>
          </dl>
        </Panel>
        <Panel className="p-4">
          <h2 className="text-sm font-semibold text-ink-900">Justification</h2>
          <p className="mt-1 whitespace-pre-wrap text-sm leading-6 text-ink-800">{waiver.justification}</p>
          {waiver.decisionComment && (
            <>
              <h2 className="mt-3 text-sm font-semibold text-ink-900">Reviewer’s comment</h2>
              <p className="mt-1 whitespace-pre-wrap text-sm text-ink-800">{waiver.decisionComment}</p>
            </>
          )}
          {waiver.revokeReason && (
            <>
              <h2 className="mt-3 text-sm font-semibold text-ink-900">Why it was revoked</h2>
              <p className="mt-1 whitespace-pre-wrap text-sm text-ink-800">{waiver.revokeReason}</p>
            </>
          )}
        </Panel>
        <p className="text-xs text-ink-600">{REVIEW_CAUTION}</p>
      </div>
      <div className="space-y-4">
        {waiver.state === 'requested' && canDecide && (
          <Panel className="p-4">
            <h2 className="mb-2 text-sm font-semibold text-ink-900">Your decision</h2>
            <WaiverDecisionForm waiver={waiver} />
          </Panel>
        )}
        {ownPendingRequest && (
          <Panel className="p-4">
            <WaiverRevokeForm waiver={waiver} withdraw />
          </Panel>
        )}
        {/* A pending request is rejected, with a reason for the designer, by whoever can decide on it; withdrawing is for the others who may revoke. */}
        {!ownPendingRequest && canRevoke && (waiver.state === 'approved' || (waiver.state === 'requested' && !canDecide)) && (
          <Panel className="p-4">
            <WaiverRevokeForm waiver={waiver} />
          </Panel>
        )}
        <Panel className="p-4">
          <h2 className="text-sm font-semibold text-ink-900">History</h2>
          <ol aria-label="History" className="mt-2 space-y-2">
            {waiver.history.map((e, i) => (
              <li key={i} className="text-sm">
                <span className="font-medium text-ink-900">{ACTIONS[e.action] ?? e.action}</span>
                <span className="text-ink-600">
                  {' '}
                  {e.actor ? `by ${e.actor.name}` : 'by Keepwell'}, {formatDateTime(e.at)}
                </span>
              </li>
            ))}
          </ol>
        </Panel>
      </div>
    </div>
  );
}

export function WaiverPage() {
  const { waiverId = '' } = useParams();
  const waiver = useQuery(waiverQuery(waiverId));
  useDocumentTitle(waiver.data ? `Waiver of ${waiver.data.ruleId}` : 'Waiver');
  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Waivers', to: '/waivers' }, { label: 'Waiver' }]}
        title={waiver.data ? `${waiver.data.ruleId} in ${waiver.data.cell ?? 'every cell'}` : 'Waiver'}
        meta={
          waiver.data && (
            <span className="flex items-center gap-2 text-sm text-ink-600">
              <StandingBadge standing={waiver.data.standing} />
              asked by {waiver.data.requester?.name ?? 'someone'} on {formatDate(waiver.data.createdAt)}
              {waiver.data.decider && waiver.data.decidedAt ? `; ${waiver.data.state === 'rejected' ? 'rejected' : 'approved'} by ${waiver.data.decider.name} on ${formatDate(waiver.data.decidedAt)}` : ''}
            </span>
          )
        }
      />
      {waiver.isPending && <Loading label="Loading the waiver…" />}
      {waiver.isError && <ErrorNotice error={waiver.error} title="Could not load the waiver" />}
      {waiver.data?.standing === 'expired' && (
        <Notice tone="warning" className="mb-4" title="This waiver has expired">
          Findings it covered show as lapsed until a new waiver is granted or the circuit is fixed.
        </Notice>
      )}
      {waiver.data && <WaiverBody waiver={waiver.data} />}
    </>
  );
}
