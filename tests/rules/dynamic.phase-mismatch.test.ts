// dynamic.phase-mismatch: a dynamic stage's precharge and its footer must take turns, so
// both are gated by one clock, and a footless stage's inputs must be low throughout
// precharge (Rabaey et al., Digital Integrated Circuits, 2nd ed., §6.3: the footer
// removes the precharge-time path to ground; without it, inputs must come from stages
// that are themselves low during precharge). The clock relations are Boolean: clk_b is
// high exactly when clk is low, and a domino output is low while its clock is low.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/dynamic/phase-mismatch';
import { findingsOf, lineOf } from '../recognition/support';

const footed = (precharge: string, footer: string, ports = 'clk clk_b') =>
  [
    `.subckt dom a b ${ports} z vdd vss`,
    `mpre x ${precharge} vdd vdd pch w=1u l=0.25u`,
    'mkp x z vdd vdd pch w=0.4u l=0.5u',
    'ma x a n1 vss nch w=1u l=0.25u',
    'mb n1 b n2 vss nch w=1u l=0.25u',
    `mf n2 ${footer} vss vss nch w=1u l=0.25u`,
    'mo z x vdd vdd pch w=3u l=0.25u',
    'mon z x vss vss nch w=1u l=0.25u',
    '.ends',
  ].join('\n');

/** A footless OR2 whose inputs come from `a`, `b`. */
const footless = (a: string, b: string) => [
  'mpre2 w clk vdd vdd pch w=1u l=0.25u',
  'mkp2 w y vdd vdd pch w=0.3u l=0.5u',
  `mc w ${a} vss vss nch w=1u l=0.25u`,
  `md w ${b} vss vss nch w=1u l=0.25u`,
  'mo2 y w vdd vdd pch w=3u l=0.25u',
  'mon2 y w vss vss nch w=1u l=0.25u',
];

describe('dynamic.phase-mismatch', () => {
  it('does not raise when precharge and footer share the clock', () => {
    expect(findingsOf(rule, footed('clk', 'clk'))).toEqual([]);
  });

  it('raises when the footer is on the complementary clock: both conduct while clk is high', () => {
    const text = footed('clk', 'clk_b');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mpre'));
    expect(f[0].message).toContain('conducts while clk is low');
    expect(f[0].devices).toEqual(expect.arrayContaining(['mpre', 'mf']));
  });

  it('raises when precharge and footer are on different clocks', () => {
    const f = findingsOf(rule, footed('phi1', 'phi2', 'phi1 phi2'));
    expect(f).toHaveLength(1);
    expect(f[0].message).toContain('not by the precharge clock phi1');
  });

  it('raises on a footless stage whose inputs are static signals, which can be high during precharge', () => {
    const text = ['.subckt fl a b clk y vdd vss', ...footless('a', 'b'), '.ends'].join('\n');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mpre2'));
    expect(f[0].message).toContain('footless');
    expect(f[0].nets).toEqual(expect.arrayContaining(['a', 'b']));
  });

  it('does not raise on a footless stage fed by domino outputs of the same clock, low during precharge', () => {
    const text = ['.subckt casc a b c clk y vdd vss', ...footed('clk', 'clk').split('\n').slice(1, -1), ...footless('z', 'z'), '.ends'].join('\n');
    // The first stage (footed) is correct, the second (footless) only sees z, which is low while clk is low.
    expect(findingsOf(rule, text)).toEqual([]);
  });
});
