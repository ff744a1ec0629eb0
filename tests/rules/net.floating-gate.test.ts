// net.floating-gate: a gate net that nothing drives has no DC solution of its own;
// ngspice reports exactly that ("singular matrix: check node …") for the same circuit,
// which is the reference here.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/net/floating-gate';
import { operatingPointLog } from '../recognition/ngspice-run';
import { MODELS, findingsOf, lineOf } from '../recognition/support';

const cell = (input: string) =>
  ['.subckt buf a y vdd vss', `mn1 m ${input} vss vss nm w=1u l=0.25u`, `mp1 m ${input} vdd vdd pm w=2u l=0.25u`, 'mn2 y m vss vss nm w=1u l=0.25u', 'mp2 y m vdd vdd pm w=2u l=0.25u', '.ends'].join('\n');

describe('net.floating-gate', () => {
  it('raises on a misspelt input that gates devices and reaches nothing; ngspice finds the same node singular', () => {
    const text = [MODELS, cell('aa')].join('\n');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].nets).toEqual(['aa']);
    expect(f[0].line).toBe(lineOf(text, 'mn1'));
    const log = operatingPointLog([MODELS, 'vdd vdd 0 2.5', 'va a 0 2.5', 'mn1 m aa 0 0 nm w=1u l=0.25u', 'mp1 m aa vdd vdd pm w=2u l=0.25u'].join('\n'));
    expect(log).toMatch(/singular matrix:\s+check node aa/);
  });

  it('does not raise on the input connected to its port', () => {
    expect(findingsOf(rule, [MODELS, cell('a')].join('\n'))).toEqual([]);
  });

  it('raises in a parent that leaves a child’s input unconnected, and not in the child', () => {
    const text = [MODELS, cell('a'), '.subckt top x z vdd vss', 'x1 x w vdd vss buf', 'x2 nc z vdd vss buf', '.ends'].join('\n');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].cell).toBe('top');
    expect(f[0].nets).toEqual(['nc']);
    expect(f[0].line).toBe(lineOf(text, 'x2'));
  });
});
