// dynamic.output-load: a dynamic node should drive only static gate inputs of its output
// stage (Rabaey et al., Digital Integrated Circuits, 2nd ed., §6.3: a domino node is
// buffered by its inverter; anything else on it shares its charge or loads it). A pass
// device from the node to an undriven net is charge sharing by construction (charge
// conservation between the two nets once the device conducts).

import { describe, expect, it } from 'vitest';
import rule from '../../rules/dynamic/output-load';
import { findingsOf, lineOf } from '../recognition/support';

const domino = (extra: string[]) =>
  [
    '.subckt dom a b clk sel z q r1 r2 vdd vss',
    'mpre x clk vdd vdd pch w=1u l=0.25u',
    'mkp x z vdd vdd pch w=0.4u l=0.5u',
    'ma x a n1 vss nch w=1u l=0.25u',
    'mb n1 b n2 vss nch w=1u l=0.25u',
    'mf n2 clk vss vss nch w=1u l=0.25u',
    'mo z x vdd vdd pch w=3u l=0.25u',
    'mon z x vss vss nch w=1u l=0.25u',
    ...extra,
    '.ends',
  ].join('\n');

describe('dynamic.output-load', () => {
  it('does not raise on a node that drives its output inverter only', () => {
    expect(findingsOf(rule, domino([]))).toEqual([]);
  });

  it('raises on a node that drives a pass device into an undriven net, at its precharge device', () => {
    const text = domino(['mp1 x sel s vss nch w=1u l=0.25u', 'mi1 q s vss vss nch w=1u l=0.25u', 'mi2 q s vdd vdd pch w=2u l=0.25u']);
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mpre'));
    expect(f[0].devices).toContain('mp1');
    expect(f[0].message).toContain('device channel');
  });

  it('raises on a node that drives the gate of a pass device', () => {
    const f = findingsOf(rule, domino(['mp1 r1 x r2 vss nch w=1u l=0.25u']));
    expect(f).toHaveLength(1);
    expect(f[0].message).toContain('pass-device gate');
  });

  it('raises on more receiving stages than the deck allows', () => {
    const fanout = ['mi1 r1 x vss vss nch w=1u l=0.25u', 'mi2 r1 x vdd vdd pch w=2u l=0.25u', 'mi3 r2 x vss vss nch w=1u l=0.25u', 'mi4 r2 x vdd vdd pch w=2u l=0.25u'];
    const f = findingsOf(rule, domino(fanout));
    expect(f).toHaveLength(1);
    expect(f[0].measured).toEqual({ value: 3, unit: 'count' });
    expect(f[0].limit).toEqual({ value: 2, unit: 'count' });
    expect(findingsOf(rule, domino(fanout), { params: { 'dynamic.output-load': { maxReceivers: 3 } } })).toEqual([]);
  });

  it('does not count an equalizing device that conducts only with the precharge clock', () => {
    const text = domino(['mpre2 y clk vdd vdd pch w=1u l=0.25u', 'meq x clk y vdd pch w=0.5u l=0.25u', 'mc y a vss vss nch w=1u l=0.25u', 'mo2 r1 y vss vss nch w=1u l=0.25u', 'mo3 r1 y vdd vdd pch w=2u l=0.25u']);
    expect(findingsOf(rule, text)).toEqual([]);
  });
});
