// One waiver as the API sends it (shared/api/waivers.ts), for the waiver pages and the overview.

import type { WaiverDetail } from '../../shared/api/waivers';
import { users } from './fixtures';
import { RUN_ID } from './runs-fixtures';

export const WAIVER_ID = 'e1000000-0000-4000-8000-000000000001';

export function waiver(over: Partial<WaiverDetail> = {}): WaiverDetail {
  return {
    id: WAIVER_ID,
    scope: 'finding',
    state: 'requested',
    standing: 'pending',
    ruleId: 'dynamic.keeper-ratio',
    cell: 'lk_dom_and2',
    fingerprint: 'fp-1',
    block: { id: '0c000000-0000-4000-8000-000000000001', name: 'tag-compare' },
    severity: 'warning',
    message: 'Keeper ratio 0.08 below 0.10.',
    devices: ['Mkeep'],
    nets: ['dyn'],
    measured: { value: 0.08, unit: 'ratio' },
    bound: null,
    justification: 'The keeper is sized for the slow corner only; the evaluate window is short.',
    requester: { id: users.designer.id, name: users.designer.name, email: users.designer.email },
    decider: null,
    decisionComment: null,
    decidedAt: null,
    expiresAt: null,
    revoker: null,
    revokedAt: null,
    revokeReason: null,
    source: { runId: RUN_ID, findingId: 103 },
    createdAt: '2026-11-20T09:00:00.000Z',
    updatedAt: '2026-11-20T09:00:00.000Z',
    history: [{ action: 'waiver.request', actor: { id: users.designer.id, name: users.designer.name, email: users.designer.email }, at: '2026-11-20T09:00:00.000Z', detail: {} }],
    ...over,
  };
}
