// How a waiver's standing and a finding's waiver status read: glyph, colour and word together.

import type { FINDING_STATUSES } from '../../../shared/api/runs';
import type { WaiverStanding } from '../../../shared/api/waivers';
import { ToneBadge, type Tone } from '../../design/severity';

export type FindingStatus = (typeof FINDING_STATUSES)[number];

export const FINDING_STATUS_LABELS: Record<FindingStatus, string> = {
  open: 'Open',
  waived: 'Waived',
  'waiver-requested': 'Waiver requested',
  'waiver-lapsed': 'Waiver lapsed',
};

const STATUS_TONES: Record<Exclude<FindingStatus, 'open'>, Tone> = { waived: 'waived', 'waiver-requested': 'info', 'waiver-lapsed': 'warning' };

/** Nothing for an open finding; a badge otherwise. */
export function FindingStatusBadge({ status }: { status: FindingStatus }) {
  if (status === 'open') return null;
  return <ToneBadge tone={STATUS_TONES[status]} label={FINDING_STATUS_LABELS[status]} />;
}

export const STANDING_LABELS: Record<WaiverStanding, string> = {
  pending: 'Awaiting decision',
  active: 'Approved',
  expired: 'Expired',
  rejected: 'Rejected',
  revoked: 'Revoked',
};

const STANDING_TONES: Record<WaiverStanding, Tone> = { pending: 'info', active: 'waived', expired: 'warning', rejected: 'error', revoked: 'warning' };

export function StandingBadge({ standing }: { standing: WaiverStanding }) {
  return <ToneBadge tone={STANDING_TONES[standing]} label={STANDING_LABELS[standing]} />;
}

/** A waiver's expiry instant is the midnight after the last day it holds. */
export function lastDay(expiresAt: string | null): string | null {
  return expiresAt ? new Date(Date.parse(expiresAt) - 1).toISOString().slice(0, 10) : null;
}
