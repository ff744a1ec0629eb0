// MOS drain-current models, written once for an n-channel device; a p-channel
// device is evaluated as its mirror image (every voltage negated, current negated).
//
// Long-channel square law (Shichman–Hodges) with channel-length modulation and body
// effect, and the unified short-channel model with a velocity-saturation voltage
// VDSAT (Rabaey, Chandrakasan, Nikolić, Digital Integrated Circuits, 2nd ed.):
//   ID = k′(W/L)[VGT·Vmin − Vmin²/2](1 + λVDS),
//   Vmin = min(VGT, VDS)            square law (VDS ≥ VGT gives k′/2·(W/L)·VGT²)
//   Vmin = min(VGT, VDS, VDSAT)     velocity-saturated
// Both are continuous across the linear/saturation boundary because (1 + λVDS)
// multiplies both regions, as SPICE level 1 does.

import type { DeviceModelKind } from '../../shared/deck';

export type Polarity = 'n' | 'p';

/** Parameters of one device type at one corner, threshold as an n-equivalent value (positive for enhancement devices of either polarity). */
export interface MosModel {
  polarity: Polarity;
  kind: DeviceModelKind;
  vt0: number;
  kPrime: number;
  lambda: number;
  gamma: number;
  phi2F: number;
  vdsat: number;
}

/** VT = VT0 + γ(√(2φF + VSB) − √(2φF)); a forward-biased body (VSB < −2φF) is clamped at the square root's zero. */
export function thresholdVoltage(m: MosModel, vsb: number): number {
  if (m.gamma === 0) return m.vt0;
  return m.vt0 + m.gamma * (Math.sqrt(Math.max(m.phi2F + vsb, 0)) - Math.sqrt(m.phi2F));
}

/** n-equivalent drain current for VDS ≥ 0; `beta` = k′·W/L. */
export function forwardCurrent(m: MosModel, beta: number, vgs: number, vds: number, vsb: number): number {
  const vgt = vgs - thresholdVoltage(m, vsb);
  if (vgt <= 0) return 0;
  let vmin = vds < vgt ? vds : vgt;
  if (m.kind === 'velocity-saturated' && m.vdsat < vmin) vmin = m.vdsat;
  return beta * (vgt * vmin - 0.5 * vmin * vmin) * (1 + m.lambda * vds);
}

/** Terminal voltages of the by-value forms below, as the by-index forms read them. */
const terminals = new Float64Array(4);

/**
 * Current flowing through the channel from terminal `a` to terminal `b`.
 * The device is symmetric: whichever of a and b is lower (higher for p-channel) acts as the source.
 */
export function channelCurrent(m: MosModel, beta: number, va: number, vb: number, vg: number, vbulk: number): number {
  terminals[0] = va;
  terminals[1] = vb;
  terminals[2] = vg;
  terminals[3] = vbulk;
  return channelCurrentAt(m, beta, terminals, 0, 1, 2, 3);
}

/**
 * Channel current from a to b and its partial derivatives with respect to the voltages of a and b
 * (gate and bulk held), written into `out` as [I, ∂I/∂Va, ∂I/∂Vb]. Analytic, region by region.
 */
export function channelCurrentSlopes(m: MosModel, beta: number, va: number, vb: number, vg: number, vbulk: number, out: Float64Array): void {
  terminals[0] = va;
  terminals[1] = vb;
  terminals[2] = vg;
  terminals[3] = vbulk;
  channelCurrentSlopesAt(m, beta, terminals, 0, 1, 2, 3, out);
}

// The currents and slopes read from a node-voltage array by node index: the network solver's form. A call that passes
// voltages as numbers boxes each one on the heap unless the compiler inlines it, and the solver makes millions of these
// calls; indices pass unboxed. The current is `forwardCurrent` of the device's source end, p-channel by mirror image.

/** `channelCurrent` with its voltages `v[a]`, `v[b]`, `v[g]`, `v[bulk]`. */
export function channelCurrentAt(m: MosModel, beta: number, v: Float64Array, a: number, b: number, g: number, bulk: number): number {
  const p = m.polarity === 'p';
  const va = p ? -v[a] : v[a];
  const vb = p ? -v[b] : v[b];
  const vg = p ? -v[g] : v[g];
  const vbulk = p ? -v[bulk] : v[bulk];
  const forward = va >= vb;
  const vs = forward ? vb : va;
  const vgs = vg - vs;
  const vds = forward ? va - vb : vb - va;
  const vsb = vs - vbulk;
  const vt = m.gamma === 0 ? m.vt0 : m.vt0 + m.gamma * (Math.sqrt(Math.max(m.phi2F + vsb, 0)) - Math.sqrt(m.phi2F));
  const vgt = vgs - vt;
  let i = 0;
  if (vgt > 0) {
    let vmin = vds < vgt ? vds : vgt;
    if (m.kind === 'velocity-saturated' && m.vdsat < vmin) vmin = m.vdsat;
    i = beta * (vgt * vmin - 0.5 * vmin * vmin) * (1 + m.lambda * vds);
  }
  const n = forward ? i : -i;
  return p ? -n : n;
}

/** `channelCurrentSlopes` with its voltages `v[a]`, `v[b]`, `v[g]`, `v[bulk]`. */
export function channelCurrentSlopesAt(m: MosModel, beta: number, v: Float64Array, a: number, b: number, g: number, bulk: number, out: Float64Array): void {
  const p = m.polarity === 'p';
  const va = p ? -v[a] : v[a];
  const vb = p ? -v[b] : v[b];
  const vg = p ? -v[g] : v[g];
  const vbulk = p ? -v[bulk] : v[bulk];
  const forward = va >= vb;
  const vs = forward ? vb : va;
  const vgs = vg - vs;
  const vds = forward ? va - vb : vb - va;
  const vsb = vs - vbulk;
  let dvt = 0;
  let vt = m.vt0;
  if (m.gamma !== 0) {
    const root = m.phi2F + vsb;
    if (root > 0) {
      const sq = Math.sqrt(root);
      vt += m.gamma * (sq - Math.sqrt(m.phi2F));
      dvt = m.gamma / (2 * sq);
    } else vt -= m.gamma * Math.sqrt(m.phi2F);
  }
  const vgt = vgs - vt;
  let i = 0;
  let gs = 0;
  let ds = 0;
  let sb = 0;
  if (vgt > 0) {
    const mod = 1 + m.lambda * vds;
    let q: number;
    let dqGt: number;
    let dqDs: number;
    if (m.kind === 'velocity-saturated' && m.vdsat < vgt && m.vdsat < vds) {
      q = vgt * m.vdsat - 0.5 * m.vdsat * m.vdsat;
      dqGt = m.vdsat;
      dqDs = 0;
    } else if (vds < vgt) {
      q = vgt * vds - 0.5 * vds * vds;
      dqGt = vds;
      dqDs = vgt - vds;
    } else {
      q = 0.5 * vgt * vgt;
      dqGt = vgt;
      dqDs = 0;
    }
    i = beta * q * mod;
    gs = beta * dqGt * mod;
    ds = beta * (dqDs * mod + q * m.lambda);
    sb = -gs * dvt;
  }
  if (forward) {
    out[0] = i;
    out[1] = ds;
    out[2] = -gs - ds + sb;
  } else {
    out[0] = -i;
    out[1] = gs + ds - sb;
    out[2] = -ds;
  }
  if (p) out[0] = -out[0];
}
