// The built-in rule deck: what the seed installs for a new team and what the
// command line uses when no deck is given. Every value says where it comes from.

import type { Corner, Deck, DeviceParams, RuleSetting } from '../shared/deck';
import { deckSchema } from '../shared/deck';
import { ruleRegistry } from './registry';

// Device parameters of the generic 0.25 µm CMOS process used throughout
// Rabaey, Chandrakasan and Nikolić, "Digital Integrated Circuits", 2nd ed. (2003),
// Table 3.2 (values recalled from memory: VT0, γ, VDSAT, k′, λ), with 2φF = 0.6 V
// as in the book's body-effect example. Capacitance and leakage per µm are rules of
// thumb of the trade for that generation, not published figures.
const nmosTypical: DeviceParams = {
  vt0: 0.43,
  kPrime: 115e-6,
  lambda: 0.06,
  gamma: 0.4,
  phi2F: 0.6,
  vdsat: 0.63,
  cjPerUm: 1.5e-15, // rule of thumb: ~1.5 fF per µm of drain/source diffusion, sidewall included
  cgPerUm: 2e-15, // rule of thumb: ~2 fF per µm of gate width at minimum length
  leakPerUm: 10e-12, // rule of thumb: ~10 pA/µm off-current at room temperature
};

const pmosTypical: DeviceParams = {
  vt0: 0.4,
  kPrime: 30e-6,
  lambda: 0.1,
  gamma: 0.4,
  phi2F: 0.6,
  vdsat: 1.0,
  cjPerUm: 1.5e-15,
  cgPerUm: 2e-15,
  leakPerUm: 5e-12,
};

/** Slow/fast skews: rule of thumb of the trade, ±10 % supply, ±50 mV threshold, ±15 % k′. */
function skew(base: DeviceParams, dvt: number, kFactor: number, leakFactor: number): DeviceParams {
  return { ...base, vt0: base.vt0 + dvt, kPrime: base.kPrime * kFactor, leakPerUm: base.leakPerUm * leakFactor };
}

export const defaultCorners: Corner[] = [
  { name: 'tt', vdd: 2.5, temperatureC: 25, model: 'velocity-saturated', nmos: nmosTypical, pmos: pmosTypical },
  {
    name: 'ss-hot',
    vdd: 2.25,
    temperatureC: 125,
    model: 'velocity-saturated',
    // Rule of thumb: subthreshold leakage grows roughly tenfold per 30–40 °C; ×100 from 25 °C to 125 °C is conservative for a slow corner.
    nmos: skew(nmosTypical, +0.05, 0.85, 100),
    pmos: skew(pmosTypical, +0.05, 0.85, 100),
  },
  {
    name: 'ff-hot',
    vdd: 2.75,
    temperatureC: 125,
    model: 'velocity-saturated',
    // The corner that empties an unkept dynamic node fastest: low threshold, hot, high supply.
    nmos: skew(nmosTypical, -0.05, 1.15, 1000),
    pmos: skew(pmosTypical, -0.05, 1.15, 1000),
  },
];

export function defaultRuleSettings(): Record<string, RuleSetting> {
  const out: Record<string, RuleSetting> = {};
  for (const rule of ruleRegistry) {
    out[rule.meta.id] = { enabled: true, severity: rule.meta.defaultSeverity, params: rule.params.parse({}) as Record<string, unknown> };
  }
  return out;
}

export function defaultDeck(): Deck {
  return deckSchema.parse({
    format: 'keepwell-deck',
    formatVersion: 1,
    name: 'Keepwell built-in deck',
    description:
      'Starting point for a team deck. Corners model a generic 0.25 µm process; replace them with your foundry\u2019s values before relying on any absolute figure.',
    corners: defaultCorners,
    clocks: {
      roots: [
        { pattern: 'clk*', phase: '', polarity: 'true' },
        { pattern: 'ck*', phase: '', polarity: 'true' },
        { pattern: 'phi*', phase: '', polarity: 'true' },
      ],
      invertedSuffixes: ['_bar', 'bar', '_b', '_n', '_l', 'b', 'n'],
    },
    supplies: {
      // vpb/vnb: the well and substrate taps of standard-cell libraries, tied to the rails at the top.
      power: ['vdd*', 'vcc*', 'vpwr*', 'vccd*', 'vpb'],
      ground: ['vss*', 'gnd*', 'vgnd*', 'vssd*', '0', 'vnb'],
    },
    deviceMap: [
      { pattern: '*nfet*', kind: 'nmos' },
      { pattern: '*nch*', kind: 'nmos' },
      { pattern: '*nmos*', kind: 'nmos' },
      { pattern: '*pfet*', kind: 'pmos' },
      { pattern: '*pch*', kind: 'pmos' },
      { pattern: '*pmos*', kind: 'pmos' },
      // Open PDKs name their junction diodes after the wells (diode_pw2nd, ndiode…): subcircuit
      // instances of them are diodes, not cells to look into.
      { pattern: '*diode*', kind: 'diode' },
    ],
    scale: 1,
    // Rule of thumb: the slowest clock a block sees is its scan/test clock; 100 ns (10 MHz) is a common floor.
    slowestClockPeriod: 100e-9,
    useNetlistModels: true,
    rules: defaultRuleSettings(),
  });
}
