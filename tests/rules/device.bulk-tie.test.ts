// device.bulk-tie: in bulk CMOS the n-channel body is the p-type substrate at ground and the
// p-channel body its n-well at the supply (Rabaey et al., Digital Integrated Circuits, 2nd
// ed., §2.3). A body on the wrong rail forward-biases a junction: ngspice, with the
// level-1 cards' default junction saturation current, shows the supply then delivering
// junction current through the body terminal, where the correct tie draws none.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/device/bulk-tie';
import { operatingPoint } from '../recognition/ngspice-run';
import { MODELS, findingsOf, lineOf } from '../recognition/support';

const inverter = (nBody: string, pBody = 'vdd') => [MODELS, '.subckt inv a y vdd vss', `mn y a vss ${nBody} nm w=1u l=0.25u`, `mp y a vdd ${pBody} pm w=2u l=0.25u`, '.ends'].join('\n');

describe('device.bulk-tie', () => {
  it('does not raise on bodies tied to their rails', () => {
    expect(findingsOf(rule, inverter('vss'))).toEqual([]);
  });

  it('raises on an n-channel body on the supply; ngspice shows the forward-biased junction conducting', () => {
    const text = inverter('vdd');
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mn'));
    expect(f[0].message).toContain('supply rail');
    const op = (body: string) => operatingPoint([MODELS, 'vdd vdd 0 2.5', 'va a 0 2.5', `mn y a 0 ${body} nm w=1u l=0.25u`, 'mp y a vdd vdd pm w=2u l=0.25u'].join('\n'), ['i(vdd)'])[0];
    expect(Math.abs(op('vdd'))).toBeGreaterThan(1e3 * Math.abs(op('0')));
  });

  it('raises on a body on a signal net, and on a body tied to its own source unless the deck accepts separate wells', () => {
    const signal = findingsOf(rule, inverter('a'));
    expect(signal).toHaveLength(1);
    expect(signal[0].message).toContain('signal net');
    const own = [MODELS, '.subckt pg a s y vdd vss', 'mt a s y y nm w=1u l=0.25u', 'mi z y vss vss nm w=1u l=0.25u', 'mj z y vdd vdd pm w=2u l=0.25u', '.ends'].join('\n');
    expect(findingsOf(rule, own)).toHaveLength(1);
    expect(findingsOf(rule, own, { params: { 'device.bulk-tie': { acceptSourceTied: true } } })).toEqual([]);
  });

  it('infers a second supply from its wells: a port that is only p-channel body and source is a supply, not a signal', () => {
    const text = [MODELS, '.subckt ls a y vddl vdd vss', 'mn y a vss vss nm w=1u l=0.25u', 'mp y a vddl vddl pm w=2u l=0.25u', '.ends'].join('\n');
    expect(findingsOf(rule, text)).toEqual([]);
  });
});
