// dynamic.cascade-monotonicity: the inputs of a dynamic stage may only rise during
// evaluation (Rabaey et al., Digital Integrated Circuits, 2nd ed., §6.3, the
// monotonicity requirement that domino logic meets with its output inverter). A
// precharged node is high when evaluation starts and can only fall; so is the NAND of two
// domino outputs (1 while both are low, in precharge), by Boolean evaluation.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/dynamic/cascade-monotonicity';
import { findingsOf, lineOf } from '../recognition/support';

const first = [
  'mpre1 x clk vdd vdd pch w=1u l=0.25u',
  'mkp1 x y vdd vdd pch w=0.4u l=0.5u',
  'ma x a n1 vss nch w=1u l=0.25u',
  'mb n1 b n2 vss nch w=1u l=0.25u',
  'mf1 n2 clk vss vss nch w=1u l=0.25u',
  'mo1 y x vdd vdd pch w=3u l=0.25u',
  'mon1 y x vss vss nch w=1u l=0.25u',
];
const second = (input: string) => [
  'mpre2 w clk vdd vdd pch w=1u l=0.25u',
  'mkp2 w z vdd vdd pch w=0.4u l=0.5u',
  `mc w ${input} m1 vss nch w=1u l=0.25u`,
  'md m1 c m2 vss nch w=1u l=0.25u',
  'mf2 m2 clk vss vss nch w=1u l=0.25u',
  'mo2 z w vdd vdd pch w=3u l=0.25u',
  'mon2 z w vss vss nch w=1u l=0.25u',
];

describe('dynamic.cascade-monotonicity', () => {
  it('raises where a dynamic node drives the next stage’s evaluation input, at the first node’s precharge device', () => {
    const text = ['.subckt casc a b c clk z vdd vss', ...first, ...second('x'), '.ends'].join('\n');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mpre1'));
    expect(f[0].message).toContain('directly');
  });

  it('does not raise through the output inverter (domino)', () => {
    expect(findingsOf(rule, ['.subckt casc a b c clk z vdd vss', ...first, ...second('y'), '.ends'].join('\n'))).toEqual([]);
  });

  it('raises on a static inverting stage between two domino stages: its output falls during evaluation', () => {
    const text = [
      '.subckt casc a b c clk z vdd vss',
      ...first,
      // a second domino output y2 from the same inputs, then NAND(y, y2) into the next stage
      'mpre3 x3 clk vdd vdd pch w=1u l=0.25u',
      'mk3 x3 y2 vdd vdd pch w=0.4u l=0.5u',
      'me x3 b n3 vss nch w=1u l=0.25u',
      'mf3 n3 clk vss vss nch w=1u l=0.25u',
      'mo3 y2 x3 vdd vdd pch w=3u l=0.25u',
      'mon3 y2 x3 vss vss nch w=1u l=0.25u',
      'mg1 nd y s1 vss nch w=1u l=0.25u',
      'mg2 s1 y2 vss vss nch w=1u l=0.25u',
      'mg3 nd y vdd vdd pch w=1u l=0.25u',
      'mg4 nd y2 vdd vdd pch w=1u l=0.25u',
      ...second('nd'),
      '.ends',
    ].join('\n');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mpre2'));
    expect(f[0].message).toContain('evaluation input nd');
  });

  it('raises inside a child whose evaluation input its parent feeds with a dynamic node', () => {
    const text = [
      '.subckt stage2 in c clk z vdd vss',
      ...second('in'),
      '.ends',
      '.subckt top a b c clk z vdd vss',
      ...first,
      'x2 x c clk z vdd vss stage2',
      '.ends',
    ].join('\n');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].cell).toBe('stage2');
    expect(f[0].line).toBe(lineOf(text, 'mpre2'));
    expect(f[0].message).toContain('from outside this cell');
  });
});
