// net.no-dc-path: nets joined only to each other through device channels have no DC level.
// With the devices' bodies on those nets too (so that no junction ties them to the
// substrate), ngspice reports the same nets singular at the operating point.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/net/no-dc-path';
import { operatingPointLog } from '../recognition/ngspice-run';
import { MODELS, findingsOf, lineOf } from '../recognition/support';

describe('net.no-dc-path', () => {
  it('raises on an island of pass devices cut off from every driver; ngspice finds it singular', () => {
    const text = [
      MODELS,
      '.subckt isl a y vdd vss',
      'mn y a vss vss nm w=1u l=0.25u',
      'mp y a vdd vdd pm w=2u l=0.25u',
      'mq q y isl isl nm w=1u l=0.25u',
      'mr isl y q2 q2 nm w=1u l=0.25u',
      'mz z q2 vss vss nm w=1u l=0.25u',
      '.ends',
    ].join('\n');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].nets.sort()).toEqual(['isl', 'q', 'q2']);
    expect(f[0].line).toBe(lineOf(text, 'mq'));
    expect(f[0].message).toContain('q2 drives gates');
    const log = operatingPointLog([MODELS, 'vdd vdd 0 2.5', 'vy y 0 2.5', 'mq q y isl isl nm w=1u l=0.25u', 'mr isl y q2 q2 nm w=1u l=0.25u', 'mz z q2 0 0 nm w=1u l=0.25u', 'rz z vdd 1k'].join('\n'));
    expect(log).toMatch(/singular matrix:\s+check node (q|isl|q2)\b/);
  });

  it('does not raise once the island reaches a driven net', () => {
    const text = [MODELS, '.subckt isl a y vdd vss', 'mn y a vss vss nm w=1u l=0.25u', 'mp y a vdd vdd pm w=2u l=0.25u', 'mq y a isl vss nm w=1u l=0.25u', 'mr isl a q2 vss nm w=1u l=0.25u', 'mz z q2 vss vss nm w=1u l=0.25u', '.ends'].join('\n');
    expect(findingsOf(rule, text)).toEqual([]);
  });

  it('treats capacitors as no DC path, resistors as one', () => {
    const base = [MODELS, '.subckt cc a y vdd vss', 'mz y m vss vss nm w=1u l=0.25u', 'mw m a m2 vss nm w=1u l=0.25u'];
    expect(findingsOf(rule, [...base, 'c1 m2 a 1f', '.ends'].join('\n'))).toHaveLength(1);
    expect(findingsOf(rule, [...base, 'r1 m2 vss 10k', '.ends'].join('\n'))).toEqual([]);
  });
});
