// An invented team for client tests and screenshots: Larkspur Silicon's core datapath group.
// Shapes follow shared/api/*.ts; every name and address here is made up.

import type { AdminUser } from '../../shared/api/admin';
import type { User } from '../../shared/api/auth';
import type { Block } from '../../shared/api/blocks';
import type { Role } from '../../shared/roles';

export const TEAM = { id: '0b6f3f1e-2a51-4c1e-9d3a-6a1f00c0ffee', name: 'Larkspur Silicon · Core datapath' };

function person(id: string, name: string, roles: Role[]): User {
  const email = `${name.toLowerCase().replace(/[^a-z]+/g, '.')}@larkspur.example`;
  return { id, email, name, roles, teamId: TEAM.id, teamName: TEAM.name };
}

export const users = {
  admin: person('8d1c2a4e-5b6f-4a7b-8c9d-0e1f2a3b4c5d', 'Ines Okafor', ['admin']),
  designer: person('1a2b3c4d-5e6f-4a8b-9c0d-1e2f3a4b5c6d', 'Tomas Lindqvist', ['designer']),
  methodology: person('2b3c4d5e-6f7a-4b9c-8d1e-2f3a4b5c6d7e', 'Priya Raman', ['methodology']),
  reviewer: person('3c4d5e6f-7a8b-4c0d-9e2f-3a4b5c6d7e8f', 'Hal Moreno', ['reviewer']),
} satisfies Record<string, User>;

export const adminUsers: AdminUser[] = [
  { ...users.admin, disabled: false, status: 'active', createdAt: '2025-09-02T08:10:00Z', lastSignInAt: '2025-12-01T08:42:00Z' },
  { ...users.designer, disabled: false, status: 'active', createdAt: '2025-09-02T08:15:00Z', lastSignInAt: '2025-11-30T17:05:00Z' },
  { ...users.methodology, disabled: false, status: 'active', createdAt: '2025-09-03T10:00:00Z', lastSignInAt: '2025-11-28T11:30:00Z' },
  { ...users.reviewer, disabled: false, status: 'active', createdAt: '2025-09-04T14:20:00Z', lastSignInAt: '2025-11-27T09:12:00Z' },
  {
    ...person('4d5e6f7a-8b9c-4d1e-8f3a-4b5c6d7e8f9a', 'Juno Asante', ['designer']),
    disabled: false,
    status: 'invited',
    createdAt: '2025-11-30T16:02:00Z',
    lastSignInAt: null,
  },
  {
    ...person('5e6f7a8b-9c0d-4e2f-9a4b-5c6d7e8f9a0b', 'Ravi Castellanos', ['designer', 'reviewer']),
    disabled: true,
    status: 'disabled',
    createdAt: '2025-09-10T09:00:00Z',
    lastSignInAt: '2025-10-15T13:45:00Z',
  },
];

export const blocks: Block[] = [
  { id: 'a1000000-0000-4000-8000-000000000001', name: 'lk_rf_64x32', description: '64-entry × 32-bit register file, two read ports and one write port', createdAt: '2025-09-12T09:30:00Z' },
  { id: 'a1000000-0000-4000-8000-000000000002', name: 'lk_tagcmp_dom8', description: 'Footed domino 8-input AND in the tag compare, with keeper', createdAt: '2025-10-01T13:10:00Z' },
  { id: 'a1000000-0000-4000-8000-000000000003', name: 'lk_bypass_pgmux4', description: 'Pass-gate 4:1 bypass mux ahead of the operand latches', createdAt: '2025-10-20T15:45:00Z' },
  { id: 'a1000000-0000-4000-8000-000000000004', name: 'lk_opnd_latch', description: 'Operand latch bank, 64 bits, transparent on phase 1', createdAt: '2025-11-05T10:00:00Z' },
  { id: 'a1000000-0000-4000-8000-000000000005', name: 'lk_sa_periph', description: 'Sense amplifiers and column periphery of the L0 data array', createdAt: '2025-11-24T08:20:00Z' },
];

export const outbox = [
  {
    id: 'b2000000-0000-4000-8000-000000000003',
    to: 'juno.asante@larkspur.example',
    subject: 'You are invited to Larkspur Silicon · Core datapath on Keepwell',
    status: 'sent' as const,
    error: null,
    attempts: 1,
    createdAt: '2025-11-30T16:02:00Z',
    sentAt: '2025-11-30T16:02:03Z',
    text: 'Hello Juno,\n\nInes Okafor invited you to join Larkspur Silicon · Core datapath on Keepwell as a Designer.\n\nChoose your password here (the link works once and expires in 7 days):\nhttp://127.0.0.1:5180/accept-invite?token=demo-token-not-real-0000000000\n\nKeepwell',
    html: '<p>Hello Juno,</p><p>Ines Okafor invited you to join <b>Larkspur Silicon · Core datapath</b> on Keepwell as a Designer.</p><p><a href="http://127.0.0.1:5180/accept-invite?token=demo-token-not-real-0000000000">Choose your password</a> (the link works once and expires in 7 days).</p>',
  },
  {
    id: 'b2000000-0000-4000-8000-000000000002',
    to: 'tomas.lindqvist@larkspur.example',
    subject: 'Reset your Keepwell password',
    status: 'sent' as const,
    error: null,
    attempts: 1,
    createdAt: '2025-11-29T07:55:00Z',
    sentAt: '2025-11-29T07:55:02Z',
    text: 'Someone asked to reset the password of this account. If it was you, choose a new one here:\nhttp://127.0.0.1:5180/reset-password?token=demo-token-not-real-1111111111\n\nIf not, ignore this message.',
    html: null,
  },
  {
    id: 'b2000000-0000-4000-8000-000000000001',
    to: 'ravi.castellanos@larkspur.example',
    subject: 'Reset your Keepwell password',
    status: 'failed' as const,
    error: '550 5.1.1 mailbox unavailable',
    attempts: 5,
    createdAt: '2025-11-20T12:00:00Z',
    sentAt: null,
    text: 'Someone asked to reset the password of this account.',
    html: null,
  },
];

/** A small invented netlist: a footed domino AND2 with a keeper and an output inverter. */
export const DOMINO_AND2 = `* Larkspur tag compare: footed domino AND2 with keeper (invented example)
*.PININFO clk:I a:I b:I y:O vdd:B vss:B
.param wn=0.4u wp=0.6u lmin=0.15u
.subckt lk_dom_and2 clk a b y vdd vss params: wk=0.2u
* precharge and footer, both on clk
Mpre dyn clk vdd vdd pch w=wp l=lmin
Mfoot foot clk vss vss nch w={2*wn} l=lmin
* evaluate stack
Ma dyn a mid vss nch w={2*wn} l=lmin $ top of the stack
Mb mid b foot vss nch w={2*wn} l=lmin
* keeper: weak pmos fed back from the output
Mkeep dyn y vdd vdd pch w=wk l={2*lmin}
+ m=1 nf=1
* output inverter
Minvp y dyn vdd vdd pch w={3*wp} l=lmin
Minvn y dyn vss vss nch w=wn l=lmin ; restoring stage
Cdyn dyn 0 2.5fF
.ends lk_dom_and2

Xtag0 clk a0 b0 hit0 vdd vss / lk_dom_and2 wk=0.18u
Vdd vdd 0 1.8
Vss vss 0 0
.end
`;
