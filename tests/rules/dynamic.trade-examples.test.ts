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

describe('domino examples of the trade, every rule enabled', () => {
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
