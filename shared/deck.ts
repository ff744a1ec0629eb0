// The rule deck: what a team runs, how severe each rule is, with which thresholds,
// at which process corners, and how it names clocks, supplies and devices.
// This schema is shared by the command line, the server, the worker and the client.
// Values are SI units throughout (volts, amperes, farads, metres, seconds, kelvin
// only where named); the client shows them with engineering prefixes.

import { z } from 'zod';

export const severitySchema = z.enum(['error', 'warning', 'info']);
export type Severity = z.infer<typeof severitySchema>;

export const deviceModelKindSchema = z.enum(['square-law', 'velocity-saturated']);
export type DeviceModelKind = z.infer<typeof deviceModelKindSchema>;

/** Per-polarity device parameters. Threshold is given as a magnitude for both polarities. */
export const deviceParamsSchema = z.object({
  vt0: z.number().min(0).max(2).meta({ unit: 'V', label: 'Zero-bias threshold |VT0|' }),
  kPrime: z.number().min(1e-7).max(5e-3).meta({ unit: 'A/V²', label: "Process transconductance k′ = µCox" }),
  lambda: z.number().min(0).max(2).meta({ unit: '1/V', label: 'Channel-length modulation λ' }),
  gamma: z.number().min(0).max(3).meta({ unit: '√V', label: 'Body-effect coefficient γ' }),
  phi2F: z.number().min(0.1).max(2).meta({ unit: 'V', label: 'Surface potential 2φF' }),
  vdsat: z.number().min(0.01).max(5).meta({ unit: 'V', label: 'Velocity-saturation voltage VDSAT' }),
  cjPerUm: z.number().min(0).max(1e-13).meta({ unit: 'F/µm', label: 'Junction capacitance per µm of width' }),
  cgPerUm: z.number().min(0).max(1e-13).meta({ unit: 'F/µm', label: 'Gate capacitance per µm of width' }),
  leakPerUm: z.number().min(0).max(1e-5).meta({ unit: 'A/µm', label: 'Off-state leakage per µm of width' }),
});
export type DeviceParams = z.infer<typeof deviceParamsSchema>;

export const cornerSchema = z.object({
  name: z.string().min(1).max(40).regex(/^[A-Za-z0-9_.-]+$/),
  vdd: z.number().min(0.2).max(20).meta({ unit: 'V', label: 'Supply VDD' }),
  temperatureC: z.number().min(-60).max(200).meta({ unit: '°C', label: 'Temperature' }),
  model: deviceModelKindSchema,
  nmos: deviceParamsSchema,
  pmos: deviceParamsSchema,
});
export type Corner = z.infer<typeof cornerSchema>;

export const polaritySchema = z.enum(['true', 'inverted']);
export type ClockPolarity = z.infer<typeof polaritySchema>;

/** Glob pattern over net or model names: `*` any run, `?` one character, case-insensitive, whole name. */
export const patternSchema = z.string().min(1).max(200);

export const clockRootSchema = z.object({
  pattern: patternSchema,
  /** Phase name; empty means "the matched name with any inverted suffix removed". */
  phase: z.string().max(40).default(''),
  polarity: polaritySchema,
});
export type ClockRoot = z.infer<typeof clockRootSchema>;

export const deviceMapEntrySchema = z.object({
  pattern: patternSchema,
  kind: z.enum(['nmos', 'pmos', 'resistor', 'capacitor', 'diode', 'ignore']),
});
export type DeviceMapEntry = z.infer<typeof deviceMapEntrySchema>;

export const ruleSettingSchema = z.object({
  enabled: z.boolean(),
  severity: severitySchema,
  /** Validated against the rule's own parameter schema by `validateDeck` in rules/. */
  params: z.record(z.string(), z.unknown()),
});
export type RuleSetting = z.infer<typeof ruleSettingSchema>;

export const deckSchema = z.object({
  format: z.literal('keepwell-deck'),
  formatVersion: z.literal(1),
  name: z.string().min(1).max(120),
  description: z.string().max(4000).default(''),
  corners: z.array(cornerSchema).min(1).max(16),
  clocks: z.object({
    roots: z.array(clockRootSchema).max(200),
    /** Name endings that mean the inverted phase of a clock root (`clk_b`, `clkn`, `ckbar`). */
    invertedSuffixes: z.array(z.string().min(1).max(10)).max(40),
  }),
  supplies: z.object({
    power: z.array(patternSchema).max(100),
    ground: z.array(patternSchema).max(100),
  }),
  /** First matching entry wins. Applied to `.model`-less device names and to `X` lines naming an undefined subcircuit. */
  deviceMap: z.array(deviceMapEntrySchema).max(200),
  /** Length scale applied when the netlist has no `.option scale` (1 = values are in metres). */
  scale: z.number().min(1e-12).max(1).meta({ unit: '', label: 'Default scale' }),
  /** The longest time a dynamic node must hold its charge (the slowest clock's period, test modes included). */
  slowestClockPeriod: z.number().min(1e-12).max(1).meta({ unit: 's', label: 'Slowest clock period' }),
  /** `.model` level-1 parameters override the corner for devices that name them, unless this is false. */
  useNetlistModels: z.boolean(),
  rules: z.record(z.string(), ruleSettingSchema),
});
export type Deck = z.infer<typeof deckSchema>;

/** Convert a deck glob pattern to an anchored, case-insensitive regular expression. */
export function globToRegExp(pattern: string): RegExp {
  let re = '^';
  for (const ch of pattern) {
    if (ch === '*') re += '.*';
    else if (ch === '?') re += '.';
    else re += ch.replace(/[\\^$.|+()[\]{}]/g, '\\$&');
  }
  return new RegExp(re + '$', 'i');
}

/** Compile a list of globs into one predicate. */
export function globMatcher(patterns: readonly string[]): (name: string) => boolean {
  if (patterns.length === 0) return () => false;
  const re = new RegExp(patterns.map((p) => globToRegExp(p).source).join('|'), 'i');
  return (name) => re.test(name);
}
