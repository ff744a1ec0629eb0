// What the waivers feature puts under the finding detail's waiver state: a link to the
// deciding waiver, the waivers and requests that concern the finding, and — by role —
// asking to waive it, waiving it directly, or deciding on the request waiting for a reviewer.

import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link } from 'react-router';
import type { StoredFinding } from '../../../shared/api/runs';
import { WAIVER_SCOPE_LABELS } from '../../../shared/api/waivers';
import { Button } from '../../components/Button';
import { formatDate } from '../../lib/format';
import { useCan } from '../../lib/session';
import { findingWaiversQuery } from './queries';
import { WaiverDecisionForm, WaiverRequestForm } from './WaiverForms';
import { StandingBadge } from './WaiverStatus';

export function FindingWaiver({ finding, runId }: { finding: StoredFinding; runId: string }) {
  const canRequest = useCan('waiver.request');
  const canDecide = useCan('waiver.decide');
  const [form, setForm] = useState<'request' | 'direct' | null>(null);
  const related = useQuery(findingWaiversQuery(runId, finding.id));
  const waivers = related.data?.items ?? [];
  const pending = finding.status === 'waiver-requested' ? waivers.find((w) => w.id === finding.waiver?.id && w.state === 'requested') : undefined;
  const canAsk = finding.status === 'open' || finding.status === 'waiver-lapsed';

  return (
    <div className="mt-2 space-y-2" data-waiver-actions={finding.id}>
      {finding.waiver && (
        <p className="text-xs">
          <Link className="font-medium text-well-700 underline" to={`/waivers/${finding.waiver.id}`}>
            Open the waiver
          </Link>
        </p>
      )}

      {pending && canDecide && (
        <div className="rounded border border-ink-200 bg-white p-2.5">
          <p className="text-xs text-ink-600">
            {pending.requester?.name ?? 'A designer'} asked on {formatDate(pending.createdAt)}: <span className="text-ink-900">{pending.justification}</span>
          </p>
          <div className="mt-2">
            <WaiverDecisionForm waiver={pending} />
          </div>
        </div>
      )}

      {canAsk && form === null && (canRequest || canDecide) && (
        <div className="flex gap-2">
          {canRequest && (
            <Button size="sm" onClick={() => setForm('request')}>
              Ask to waive
            </Button>
          )}
          {canDecide && (
            <Button size="sm" onClick={() => setForm('direct')}>
              Waive
            </Button>
          )}
        </div>
      )}
      {form && <WaiverRequestForm finding={finding} runId={runId} direct={form === 'direct'} onDone={() => setForm(null)} onCancel={() => setForm(null)} />}

      {waivers.length > 0 && (
        <ul aria-label="Waivers of this finding" className="space-y-1.5 border-t border-ink-200 pt-2">
          {waivers.map((w) => (
            <li key={w.id} className="text-xs text-ink-700">
              <div className="flex flex-wrap items-center gap-1.5">
                <StandingBadge standing={w.standing} />
                <Link className="font-medium text-well-700 underline" to={`/waivers/${w.id}`}>
                  {WAIVER_SCOPE_LABELS[w.scope].label}
                </Link>
                <span>
                  asked by {w.requester?.name ?? 'someone'} on {formatDate(w.createdAt)}
                  {w.decider && w.decidedAt ? `, ${w.state === 'rejected' ? 'rejected' : 'approved'} by ${w.decider.name} on ${formatDate(w.decidedAt)}` : ''}
                </span>
              </div>
              <p className="mt-0.5 text-ink-600">{w.justification}</p>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
