// The domino examples the trade teaches (Rabaey, Chandrakasan and Nikolić, Digital
// Integrated Circuits, 2nd ed., §6.3): a footed domino gate with a half keeper is the
// correct form; without its keeper it loses its level to leakage; with its precharge
// device on the complementary clock the precharge and the footer conduct together; and
// two dynamic stages cascaded without the inverter between them break the rule that
// evaluation inputs may only rise. Every rule of the registry runs; each broken form
// must raise exactly its own rule, at the line of the precharge device.

import { describe, expect, it } from 'vitest';
import { check, ids, lineOf } from '../recognition/support';

function dominoAnd2(options: { keeper?: boolean; prechargeClock?: string } = {}): string {
  const { keeper = true, prechargeClock = 'clk' } = options;
  return [
    '* footed domino AND2 with a half keeper',
    '.subckt dom_and2 a b clk clk_b z vdd vss',
    `mpre x ${prechargeClock} vdd vdd pch w=1u l=0.25u`,
    keeper ? 'mkp x z vdd vdd pch w=0.4u l=0.5u' : '* (no keeper)',
    'ma x a n1 vss nch w=1u l=0.25u',
    'mb n1 b n2 vss nch w=1u l=0.25u',
    'mf n2 clk vss vss nch w=1u l=0.25u',
    'mo z x vdd vdd pch w=3u l=0.25u',
    'mon z x vss vss nch w=1u l=0.25u',
    '.ends',
  ].join('\n');
}

const cascade = [
  '* two footed domino stages; the first dynamic node drives the second stage directly',
  '.subckt dom_casc a b c clk z vdd vss',
  'mpre1 x clk vdd vdd pch w=1u l=0.25u',
  'mkp1 x y vdd vdd pch w=0.4u l=0.5u',
  'ma x a n1 vss nch w=1u l=0.25u',
  'mb n1 b n2 vss nch w=1u l=0.25u',
  'mf1 n2 clk vss vss nch w=1u l=0.25u',
  'mo1 y x vdd vdd pch w=3u l=0.25u',
  'mon1 y x vss vss nch w=1u l=0.25u',
  'mpre2 w clk vdd vdd pch w=1u l=0.25u',
  'mkp2 w z vdd vdd pch w=0.4u l=0.5u',
  'mc w x m1 vss nch w=1u l=0.25u',
  'md m1 c m2 vss nch w=1u l=0.25u',
  'mf2 m2 clk vss vss nch w=1u l=0.25u',
  'mo2 z w vdd vdd pch w=3u l=0.25u',
  'mon2 z w vss vss nch w=1u l=0.25u',
  '.ends',
].join('\n');

// Structures with clocks or missing pull-ups that are not dynamic nodes (Rabaey et al. §6.2 and §7.2): a latch whose
// clocked feedback holds its node, a clocked inverter, a transmission-gate multiplexer and its inverter, and a
// pseudo-n-channel gate, which only the ratioed-logic rule reports.
const tricky = [
  '.subckt latch d clk clk_b q vdd vss',
  'mtn d clk m vss nch w=1u l=0.25u',
  'mtp d clk_b m vdd pch w=2u l=0.25u',
  'mqn q m vss vss nch w=1u l=0.25u',
  'mqp q m vdd vdd pch w=3u l=0.25u',
  'mf1 vdd q f1 vdd pch w=1u l=0.25u',
  'mf2 f1 clk m vdd pch w=1u l=0.25u',
  'mf3 m clk_b f2 vss nch w=0.5u l=0.25u',
  'mf4 f2 q vss vss nch w=0.5u l=0.25u',
  '.ends',
  '.subckt cinv a clk clk_b y vdd vss',
  'mp1 vdd a s1 vdd pch w=2u l=0.25u',
  'mp2 s1 clk_b y vdd pch w=2u l=0.25u',
  'mn2 y clk s2 vss nch w=1u l=0.25u',
  'mn1 s2 a vss vss nch w=1u l=0.25u',
  '.ends',
  '.subckt tgmux a b s s_b y vdd vss',
  'mna a s_b m vss nch w=1u l=0.25u',
  'mpa a s m vdd pch w=2u l=0.25u',
  'mnb b s m vss nch w=1u l=0.25u',
  'mpb b s_b m vdd pch w=2u l=0.25u',
  'mon y m vss vss nch w=1u l=0.25u',
  'mop y m vdd vdd pch w=3u l=0.25u',
  '.ends',
  '.subckt pseudo a b y vdd vss',
  'mpu y vss vdd vdd pch w=0.5u l=0.5u',
  'mna y a vss vss nch w=2u l=0.25u',
  'mnb y b vss vss nch w=2u l=0.25u',
  '.ends',
].join('\n');

describe('domino examples of the trade, every rule enabled', () => {
  it('raises nothing on a latch, a clocked inverter or a transmission-gate mux, and only the ratioed-logic note on a pseudo-n-channel gate', () => {
    const findings = check(tricky);
    expect(findings.map((f) => `${f.cell}:${f.ruleId}`)).toEqual(['pseudo:stage.ratioed-logic']);
  });

  it('a footed domino gate with a correctly sized half keeper raises nothing', () => {
    expect(check(dominoAnd2())).toEqual([]);
  });

  it('the same gate without its keeper raises dynamic.no-keeper only, at its precharge device', () => {
    const text = dominoAnd2({ keeper: false });
    const findings = check(text);
    expect(ids(findings)).toEqual(['dynamic.no-keeper']);
    expect(findings[0].line).toBe(lineOf(text, 'mpre'));
    expect(findings[0].nets).toEqual(['x']);
  });

  it('the same gate precharged by the complementary clock raises dynamic.phase-mismatch only, at its precharge device', () => {
    const text = dominoAnd2({ prechargeClock: 'clk_b' });
    const findings = check(text);
    expect(ids(findings)).toEqual(['dynamic.phase-mismatch']);
    expect(findings[0].line).toBe(lineOf(text, 'mpre'));
    expect(findings[0].message).toContain('complementary clock');
  });

  it('two stages cascaded without an inverter raise dynamic.cascade-monotonicity only, at the first stage’s precharge device', () => {
    const findings = check(cascade);
    expect(ids(findings)).toEqual(['dynamic.cascade-monotonicity']);
    expect(findings[0].line).toBe(lineOf(cascade, 'mpre1'));
    expect(findings[0].devices).toContain('mpre2');
  });

  it('the cascade through the first stage’s inverter is clean', () => {
    expect(check(cascade.replace('mc w x m1', 'mc w y m1'))).toEqual([]);
  });
});
