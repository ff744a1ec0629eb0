// The waiver forms: asking to waive a finding (a designer) or waiving it directly (a
// reviewer), with scope, justification, an optional expiry date and an optional bound
// on the measured value; and a reviewer's decision on a request, or a revocation.

import { useId, useState, type FormEvent } from 'react';
import type { StoredFinding } from '../../../shared/api/runs';
import { WAIVER_SCOPE_LABELS, WAIVER_SCOPES, type WaiverScope, type WaiverView } from '../../../shared/api/waivers';
import { Button } from '../../components/Button';
import { TextAreaField, TextField } from '../../components/Field';
import { ErrorNotice } from '../../components/Notice';
import { formatQuantity } from '../findings/quantity';
import { useCreateWaiver, useDecideWaiver, useRevokeWaiver } from './queries';

const MIN_JUSTIFICATION = 10;

function today(): string {
  return new Date().toISOString().slice(0, 10);
}

export function WaiverRequestForm({
  finding,
  runId,
  direct,
  onDone,
  onCancel,
}: {
  finding: StoredFinding;
  runId: string;
  /** A reviewer's waiver, approved at once; otherwise a request for a reviewer. */
  direct: boolean;
  onDone: (waiver: WaiverView) => void;
  onCancel: () => void;
}) {
  const create = useCreateWaiver();
  const [scope, setScope] = useState<WaiverScope>('finding');
  const [justification, setJustification] = useState('');
  const [expiresOn, setExpiresOn] = useState('');
  const bounded = finding.measured !== null && finding.limit !== null && finding.measured.unit === finding.limit.unit && finding.measured.value !== finding.limit.value;
  const worseWhenBigger = bounded && finding.measured!.value > finding.limit!.value;
  const [useBound, setUseBound] = useState(false);
  const [bound, setBound] = useState(finding.measured ? String(finding.measured.value) : '');
  const [problem, setProblem] = useState<string | null>(null);
  const scopeName = useId();

  function submit(e: FormEvent) {
    e.preventDefault();
    if (justification.trim().length < MIN_JUSTIFICATION) {
      setProblem('Say why the finding is acceptable, in a sentence a reviewer can check.');
      return;
    }
    const boundValue = useBound ? Number(bound) : null;
    if (useBound && !Number.isFinite(boundValue)) {
      setProblem(`The bound must be a number in ${finding.measured!.unit}.`);
      return;
    }
    setProblem(null);
    create.mutate(
      { direct, runId, findingId: finding.id, scope, justification: justification.trim(), expiresAt: expiresOn || null, boundValue },
      { onSuccess: onDone },
    );
  }

  const boundPreview = useBound && Number.isFinite(Number(bound)) && finding.measured ? formatQuantity({ value: Number(bound), unit: finding.measured.unit }) : null;

  return (
    <form noValidate onSubmit={submit} aria-label={direct ? 'Waive this finding' : 'Ask to waive this finding'} className="mt-2 space-y-3">
      {create.isError && <ErrorNotice error={create.error} title={direct ? 'The finding was not waived' : 'The request was not sent'} />}
      {problem && <p className="text-xs font-medium text-error" role="alert">{problem}</p>}
      <fieldset>
        <legend className="mb-1 text-sm font-medium text-ink-800">What the waiver covers</legend>
        <div className="space-y-1.5">
          {WAIVER_SCOPES.map((s) => (
            <label key={s} className="flex items-start gap-2 text-sm">
              <input type="radio" name={scopeName} value={s} checked={scope === s} onChange={() => setScope(s)} className="mt-1" />
              <span>
                <span className="font-medium text-ink-900">{WAIVER_SCOPE_LABELS[s].label}</span>
                <span className="block text-xs text-ink-600">{WAIVER_SCOPE_LABELS[s].description}</span>
              </span>
            </label>
          ))}
        </div>
      </fieldset>
      <TextAreaField
        label="Justification"
        hint="Why the circuit is right as drawn: a reviewer reads this, and so does the review report."
        value={justification}
        onChange={(e) => setJustification(e.target.value)}
        rows={3}
        maxLength={4000}
      />
      <TextField label="Holds through (optional)" type="date" min={today()} value={expiresOn} onChange={(e) => setExpiresOn(e.target.value)} hint="The last day the waiver applies; a week ahead, the requester and approver are reminded." />
      {bounded && (
        <div className="space-y-1.5">
          <label className="flex items-center gap-2 text-sm text-ink-800">
            <input type="checkbox" checked={useBound} onChange={(e) => setUseBound(e.target.checked)} />
            Lapse when the measured value gets worse than a bound
          </label>
          {useBound && (
            <TextField
              label={`Bound (${finding.measured!.unit}, SI)`}
              inputMode="decimal"
              value={bound}
              onChange={(e) => setBound(e.target.value)}
              hint={`Measured ${formatQuantity(finding.measured)} against a limit of ${formatQuantity(finding.limit)}: the waiver lapses when a later run measures ${worseWhenBigger ? 'more' : 'less'} than ${boundPreview ?? 'the bound'}.`}
            />
          )}
        </div>
      )}
      <div className="flex gap-2">
        <Button type="submit" variant="primary" size="sm" busy={create.isPending}>
          {direct ? 'Waive' : 'Ask a reviewer'}
        </Button>
        <Button size="sm" variant="ghost" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/** A reviewer's decision on a request: approval in one click (a comment is optional), rejection with a reason. */
export function WaiverDecisionForm({ waiver, onDone }: { waiver: WaiverView; onDone?: (w: WaiverView) => void }) {
  const decide = useDecideWaiver();
  const [comment, setComment] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const send = (decision: 'approve' | 'reject') => {
    if (decision === 'reject' && !comment.trim()) {
      setProblem('Say why the request is rejected; the designer reads it.');
      return;
    }
    setProblem(null);
    decide.mutate({ id: waiver.id, decision, comment: comment.trim() }, { onSuccess: onDone });
  };
  return (
    <form noValidate aria-label="Decide on the request" onSubmit={(e) => (e.preventDefault(), send('approve'))} className="space-y-2">
      {decide.isError && <ErrorNotice error={decide.error} title="The decision was not recorded" />}
      {problem && <p className="text-xs font-medium text-error" role="alert">{problem}</p>}
      <TextAreaField label="Comment" hint="Optional when approving; needed to reject." value={comment} onChange={(e) => setComment(e.target.value)} rows={2} maxLength={4000} />
      <div className="flex gap-2">
        <Button type="submit" variant="primary" size="sm" busy={decide.isPending && decide.variables?.decision === 'approve'}>
          Approve
        </Button>
        <Button variant="danger" size="sm" onClick={() => send('reject')} busy={decide.isPending && decide.variables?.decision === 'reject'}>
          Reject
        </Button>
      </div>
    </form>
  );
}

/** Revoke a waiver or request (reviewer, admin), or, with `withdraw`, take back one's own pending request (designer). */
export function WaiverRevokeForm({ waiver, withdraw = false, onDone }: { waiver: WaiverView; withdraw?: boolean; onDone?: (w: WaiverView) => void }) {
  const revoke = useRevokeWaiver();
  const [reason, setReason] = useState('');
  const [open, setOpen] = useState(false);
  if (!open) {
    return (
      <Button size="sm" variant="danger" onClick={() => setOpen(true)}>
        {waiver.state === 'requested' ? 'Withdraw the request' : 'Revoke'}
      </Button>
    );
  }
  return (
    <form
      noValidate
      aria-label={withdraw ? 'Withdraw the request' : 'Revoke the waiver'}
      className="space-y-2"
      onSubmit={(e) => {
        e.preventDefault();
        if (reason.trim()) revoke.mutate({ id: waiver.id, reason: reason.trim(), withdraw }, { onSuccess: onDone });
      }}
    >
      {revoke.isError && <ErrorNotice error={revoke.error} title="The waiver was not revoked" />}
      <TextAreaField label={withdraw ? 'Why the request is withdrawn' : 'Why it no longer applies'} value={reason} onChange={(e) => setReason(e.target.value)} rows={2} maxLength={4000} required />
      <div className="flex gap-2">
        <Button type="submit" size="sm" variant="danger" busy={revoke.isPending} disabled={!reason.trim()}>
          {withdraw ? 'Withdraw' : 'Revoke'}
        </Button>
        <Button size="sm" variant="ghost" onClick={() => setOpen(false)}>
          Keep it
        </Button>
      </div>
    </form>
  );
}
