// Electrical analysis of a cell's static stages: for every stage, every input and
// every corner, the DC transfer curve with the other inputs held at each
// combination that lets the swept input control the output (their non-controlling
// values), and the worst of those cases.
//
// Solves are memoised by stage signature — element types, sizes, resolved device
// parameters, topology, held inputs and supply — per design, so a netlist of a
// million devices built from a few thousand distinct stages costs a few thousand
// solves.

import type { Cell, Design, RailKind } from '../../grammar/design';
import type { Corner, Deck } from '../../shared/deck';
import type { CircuitElement, Network } from '../electrical/network';
import { mapNetwork } from '../electrical/network';
import { ModelResolver, type ResolvedModel } from '../electrical/parameters';
import { analyseTransfer, FIRST_INTERNAL, GROUND, INPUT, OUTPUT, POWER, TransferSolver, type StageCircuit, type TransferResult } from '../electrical/transfer';
import { outputValue, stageLogic } from './classify';
import type { Stage } from './stage';
import { GROUND_END, POWER_END, elementIndex, isMosElement } from './stage';
import { modelCode, NumberKey, NumberKeyTable } from '../signature-key';

/** Kinds with a static transfer curve. */
export const STATIC_KINDS: ReadonlySet<Stage['kind']> = new Set(['inverter', 'complementary', 'ratioed', 'clocked']);

/** At most this many held-input combinations are solved per swept input (spread over the sensitising ones). */
export const MAX_CASES_PER_INPUT = 6;
const MAX_ENUMERATED_OTHERS = 10;
/** Input assignments are bit masks; wider stages are not analysed. */
const MAX_ANALYSED_INPUTS = 30;

export interface HeldInput {
  net: number;
  high: boolean;
}

export interface TransferCase {
  held: HeldInput[];
  result: TransferResult;
}

export interface ModelUse {
  polarity: 'n' | 'p';
  model: string;
  resolved: ResolvedModel;
}

export interface CornerAnalysis {
  corner: string;
  vdd: number;
  cases: TransferCase[];
  /** The case with the smallest noise margin (a case without unity-gain points counts as none). */
  worstMargin: TransferCase;
  /** The case with the smallest gain magnitude at its switching threshold. */
  weakestGain: TransferCase;
  models: ModelUse[];
}

export interface InputAnalysis {
  input: number;
  corners: CornerAnalysis[];
}

export interface StageAnalysis {
  stage: Stage;
  inputs: InputAnalysis[];
  /** Why the stage has no transfer analysis, when it has none. */
  skipped: string | null;
  /** The analysis of one swept input (the entry of `inputs` with that net), without building the others. */
  input(net: number): InputAnalysis | undefined;
  /** The input and corner whose weakest case has the smallest gain magnitude at its threshold (the first of equals, in `inputs` order); null without inputs. */
  weakestGain(): StageExtreme | null;
  /** The input and corner whose worst-margin case has the smallest noise margin as a fraction of VDD (cases without unity-gain points left out); null when none has one. */
  smallestMargin(): StageExtreme | null;
}

/** One input at one corner, picked from a stage's analysis. */
export interface StageExtreme {
  input: number;
  /** The figure it was picked by: the gain magnitude, or the margin as a fraction of VDD. */
  value: number;
  /** Built when read, so that stages a rule passes over cost no view. */
  readonly corner: CornerAnalysis;
}

export interface AnalysisStats {
  /** Transfer curves actually solved. */
  solves: number;
  /** Transfer lookups answered from the memo. */
  hits: number;
  /** Distinct stage signatures analysed. */
  signatures: number;
}

interface DesignMemo {
  transfers: Map<string, TransferResult>;
  /** Per deck: structural stage key → analysis with inputs by position. */
  stages: WeakMap<Deck, NumberKeyTable<CachedStage>>;
  stats: AnalysisStats;
  resolvers: Map<Corner, Map<boolean, ModelResolver>>;
  modelKeys: Map<ResolvedModel, string>;
}

interface CachedCase {
  held: { input: number; high: boolean }[];
  result: TransferResult;
}

interface CachedStage {
  inputs: {
    input: number;
    corners: { corner: string; vdd: number; cases: CachedCase[]; worstMargin: number; weakestGain: number; models: ModelUse[] }[];
    /** The corner views, built once, when no case holds an input (they then name no net); null when some case does. */
    netFree?: CornerAnalysis[] | null;
  }[];
  /** Positions (input, corner) of `weakestGain()` and `smallestMargin()`, found once per signature; null when there is none. */
  weakest?: ExtremeAt | null;
  narrowest?: ExtremeAt | null;
}

interface ExtremeAt {
  input: number;
  corner: number;
  value: number;
}

type CachedCorner = CachedStage['inputs'][number]['corners'][number];

/**
 * Position of the smallest `measure` over the inputs, then the corners of each, taking only strict improvements (the
 * order the stage rules have always scanned in); null when no corner has a measure.
 */
function smallestAt(cached: CachedStage, measure: (c: CachedCorner) => number | null): ExtremeAt | null {
  let best: ExtremeAt | null = null;
  for (let i = 0; i < cached.inputs.length; i++) {
    const corners = cached.inputs[i].corners;
    for (let k = 0; k < corners.length; k++) {
      const value = measure(corners[k]);
      if (value !== null && (!best || value < best.value)) best = { input: i, corner: k, value };
    }
  }
  return best;
}

/** Position of the weakest gain at the switching threshold. */
function weakestAt(cached: CachedStage): ExtremeAt | null {
  return smallestAt(cached, (c) => Math.abs(c.cases[c.weakestGain].result.gainAtVm));
}

/** Position of the narrowest noise margin, as a fraction of the supply. */
function narrowestAt(cached: CachedStage): ExtremeAt | null {
  return smallestAt(cached, (c) => {
    const r = c.cases[c.worstMargin].result;
    if (r.nmh === null || r.nml === null) return null;
    return (r.nmh < r.nml ? r.nmh : r.nml) / c.vdd;
  });
}

const memos = new WeakMap<Design, DesignMemo>();

function memoOf(design: Design): DesignMemo {
  let m = memos.get(design);
  if (!m) {
    m = { transfers: new Map(), stages: new WeakMap(), stats: { solves: 0, hits: 0, signatures: 0 }, resolvers: new Map(), modelKeys: new Map() };
    memos.set(design, m);
  }
  return m;
}

export function analysisStats(design: Design): AnalysisStats {
  return { ...memoOf(design).stats };
}

function resolverFor(memo: DesignMemo, design: Design, corner: Corner, useNetlistModels: boolean): ModelResolver {
  let byFlag = memo.resolvers.get(corner);
  if (!byFlag) memo.resolvers.set(corner, (byFlag = new Map()));
  let r = byFlag.get(useNetlistModels);
  if (!r) byFlag.set(useNetlistModels, (r = new ModelResolver(corner, design.models, useNetlistModels)));
  return r;
}

function modelKey(memo: DesignMemo, r: ResolvedModel): string {
  let k = memo.modelKeys.get(r);
  if (k === undefined) {
    const m = r.model;
    k = [m.polarity, m.kind, m.vt0, m.kPrime, m.lambda, m.gamma, m.phi2F, m.vdsat].join(',');
    memo.modelKeys.set(r, k);
  }
  return k;
}

function networkKey(n: Network): string {
  if (n.kind === 'leaf') return `${n.element}:${n.a}-${n.b}`;
  const inner = n.children.map(networkKey).join(' ');
  return n.kind === 'series' ? `S(${inner})[${n.nodes.join(',')}]` : `P(${inner})`;
}

/**
 * Which of a stage's elements sit in its pull-up or pull-down network (others, such as a dangling pass gate, carry no
 * output current). Written into the first `stage.elements.length` entries of `mask` when one is given.
 */
export function inNetworks(stage: Stage, mask = new Uint8Array(stage.elements.length)): Uint8Array {
  mask.fill(0, 0, stage.elements.length);
  if (stage.pullUp) markElements(stage.pullUp, mask);
  if (stage.pullDown) markElements(stage.pullDown, mask);
  return mask;
}

function markElements(n: Network, mask: Uint8Array): void {
  if (n.kind === 'leaf') mask[n.element] = 1;
  else for (const c of n.children) markElements(c, mask);
}

export interface StageEnvironment {
  design: Design;
  cell: Cell;
  deck: Deck;
  railOf: (net: number) => RailKind | undefined;
  alias: Int32Array;
}

/** Builds the compact circuit of one stage with `swept` as the input and `held` inputs at the rails. */
export function stageCircuit(
  env: StageEnvironment,
  stage: Stage,
  swept: number,
  held: readonly HeldInput[],
  resolver: ModelResolver,
  vdd: number,
  memo?: DesignMemo,
): { circuit: StageCircuit; key: string; models: ModelUse[] } {
  const { cell, railOf, alias } = env;
  const heldMap = new Map(held.map((h) => [h.net, h.high]));
  const nodes = new Map<number, number>();
  let next = FIRST_INTERNAL;
  const stageNets = new Set<number>([...stage.internal, ...(stage.output === null ? [] : [stage.output])]);
  const nodeOf = (net: number, bulkOf?: 'n' | 'p'): number => {
    if (net === POWER_END) return POWER;
    if (net === GROUND_END) return GROUND;
    const r = railOf(net);
    if (r) return r === 'power' ? POWER : GROUND;
    if (net === stage.output) return OUTPUT;
    if (net === swept) return INPUT;
    const h = heldMap.get(net);
    if (h !== undefined) return h ? POWER : GROUND;
    if (!stageNets.has(net) && bulkOf) return bulkOf === 'n' ? GROUND : POWER;
    let x = nodes.get(net);
    if (x === undefined) nodes.set(net, (x = next++));
    return x;
  };
  const pullUp = mapNetwork(stage.pullUp!, (x) => nodeOf(x));
  const pullDown = mapNetwork(stage.pullDown!, (x) => nodeOf(x));
  const elements: CircuitElement[] = [];
  const parts: string[] = [String(vdd)];
  const used = new Map<string, ModelUse>();
  const active = inNetworks(stage);
  for (let i = 0; i < stage.elements.length; i++) {
    const el = stage.elements[i];
    if (!active[i]) {
      elements.push({ kind: 'res', conductance: 0 });
      parts.push('-');
      continue;
    }
    if (!isMosElement(el)) {
      const r = cell.others[elementIndex(el)];
      const g = r.kind === 'res' && r.value > 0 ? 1 / r.value : 0;
      elements.push({ kind: 'res', conductance: g });
      parts.push(`r${g}`);
      continue;
    }
    const mos = cell.mosfets;
    const d = el;
    const polarity = mos.polarityOf(d);
    const model = mos.models[d];
    const resolved = resolver.get(polarity, model);
    used.set(polarity + '|' + model.toLowerCase(), { polarity, model, resolved });
    const beta = (resolved.model.kPrime * mos.w[d] * mos.m[d]) / mos.l[d];
    const gate = nodeOf(alias[mos.gate[d]]);
    const bulk = nodeOf(alias[mos.bulk[d]], polarity);
    elements.push({ kind: 'mos', model: resolved.model, beta, gate, bulk });
    parts.push(`m${beta}|${gate}|${bulk}|${memo ? modelKey(memo, resolved) : ''}`);
  }
  parts.push(networkKey(pullUp), networkKey(pullDown));
  return {
    circuit: { vdd, nodeCount: next, elements, pullUp, pullDown },
    key: parts.join(';'),
    models: [...used.values()],
  };
}

/** Held-input combinations under which `swept` alone decides the output (each a sensitising assignment). */
export function sensitisingCases(env: StageEnvironment, stage: Stage, swept: number): HeldInput[][] {
  const logic = stageLogic(stage, env.cell, env.railOf, env.alias);
  const bit = stage.inputs.indexOf(swept);
  // Only inputs that gate a network device can hold the output; the others are left out of the cases.
  const active = inNetworks(stage);
  const gating = new Set<number>();
  for (let e = 0; e < stage.elements.length; e++) if (active[e] && logic.inputGated(e)) gating.add(stage.inputs.indexOf(logic.gate[e]));
  if (!gating.has(bit)) return [];
  const others = [...gating].filter((i) => i !== bit).sort((x, y) => x - y);
  const masks: number[] = [];
  if (others.length <= MAX_ENUMERATED_OTHERS) {
    for (let m = 0; m < 1 << others.length; m++) masks.push(m);
  } else {
    // Too many to enumerate: all low, all high, and each single flip of those.
    const all = (1 << others.length) - 1;
    masks.push(0, all);
    for (let i = 0; i < others.length; i++) masks.push(1 << i, all & ~(1 << i));
  }
  const found: HeldInput[][] = [];
  for (const m of masks) {
    let full = 0;
    others.forEach((b, i) => {
      if ((m >> i) & 1) full |= 1 << b;
    });
    const v0 = outputValue(stage, logic, full);
    const v1 = outputValue(stage, logic, full | (1 << bit));
    if ((v0 === 0 || v0 === 1) && (v1 === 0 || v1 === 1) && v0 !== v1) {
      found.push(others.map((b, i) => ({ net: stage.inputs[b], high: ((m >> i) & 1) === 1 })));
    }
  }
  if (found.length <= MAX_CASES_PER_INPUT) return found;
  // Spread the kept cases over the range from fewest to most inputs held high.
  const ones = (c: HeldInput[]) => c.filter((h) => h.high).length;
  found.sort((x, y) => ones(x) - ones(y));
  const kept: HeldInput[][] = [];
  for (let i = 0; i < MAX_CASES_PER_INPUT; i++) kept.push(found[Math.round((i * (found.length - 1)) / (MAX_CASES_PER_INPUT - 1))]);
  return [...new Set(kept)];
}

/** Smallest noise margin of a case; −∞ when the curve has no unity-gain points. */
export function marginOf(r: TransferResult): number {
  return r.nmh === null || r.nml === null ? -Infinity : Math.min(r.nmh, r.nml);
}

/**
 * A stage's signature, independent of net names and of the corner: kind, each element's type, size, model name and the
 * roles of its gate and bulk (rail, output, input by position, internal node by first use), and the network shapes.
 * Stages with equal signatures have equal analyses under one deck. As text, for tests and tools; the analysis memo
 * keys on the numbers themselves (`SignatureEncoder`), which run once per stage of a flat netlist.
 */
export function stageSignature(env: StageEnvironment, stage: Stage): string {
  const encoder = new SignatureEncoder();
  encoder.encode(env, stage);
  return Array.from(encoder.copy()).join(',');
}

const KIND_CODES: Record<Stage['kind'], number> = { inverter: 0, complementary: 1, ratioed: 2, clocked: 3, dynamic: 4, pass: 5, other: 6 };
// Every token after a tag has a fixed arity, so an encoding reads back one way only: equal encodings, equal stages.
const TAG_INACTIVE = -10;
const TAG_RES = -11;
const TAG_N = -12;
const TAG_P = -13;
const TAG_LEAF = -20;
const TAG_PARALLEL = -21;
const TAG_SERIES = -22;
const TAG_NONE = -23;
const ROLE_POWER = -1;
const ROLE_GROUND = -2;
const ROLE_OUTPUT = -3;
/** Input i is ROLE_INPUT − i; internal nodes are 0, 1, 2 … by first use. */
const ROLE_INPUT = -16;

/** Writes a stage's signature as numbers into one reused buffer, with its hash; no strings, no per-stage closures. */
class SignatureEncoder extends NumberKey {
  /** Internal nodes by first use: `local[0 … localCount − 1]` (a count, not an array length, which costs a call to reset). */
  private local = new Int32Array(64);
  private localCount = 0;
  /** The stage being encoded and its environment, only while `encode` runs: the encoder outlives every check, the design must not. */
  private env: StageEnvironment | null = null;
  private stage: Stage | null = null;

  encode(env: StageEnvironment, stage: Stage): void {
    this.env = env;
    this.stage = stage;
    this.reset();
    this.localCount = 0;
    const { cell, alias } = env;
    this.push(KIND_CODES[stage.kind]);
    this.push(stage.elements.length);
    const active = this.activeElements(stage);
    for (let i = 0; i < stage.elements.length; i++) {
      const el = stage.elements[i];
      if (!active[i]) this.push(TAG_INACTIVE);
      else if (!isMosElement(el)) {
        const r = cell.others[elementIndex(el)];
        this.push(TAG_RES);
        this.push(r.kind === 'res' ? r.value : 0);
      } else {
        const mos = cell.mosfets;
        const k = el;
        this.push(mos.isN(k) ? TAG_N : TAG_P);
        this.push(mos.w[k]);
        this.push(mos.l[k]);
        this.push(mos.m[k]);
        this.push(modelCode(mos.models[k]));
        this.push(this.role(alias[mos.gate[k]]));
        this.push(this.role(alias[mos.bulk[k]]));
      }
    }
    this.shape(stage.pullUp);
    this.shape(stage.pullDown);
    this.env = null;
    this.stage = null;
  }

  private active = new Uint8Array(64);

  /** `inNetworks(stage)` in a buffer the encoder keeps. */
  private activeElements(stage: Stage): Uint8Array {
    const k = stage.elements.length;
    if (k > this.active.length) this.active = new Uint8Array(2 * k);
    return inNetworks(stage, this.active);
  }

  private role(net: number): number {
    if (net === POWER_END) return ROLE_POWER;
    if (net === GROUND_END) return ROLE_GROUND;
    const r = this.env!.railOf(net);
    if (r) return r === 'power' ? ROLE_POWER : ROLE_GROUND;
    const stage = this.stage!;
    if (net === stage.output) return ROLE_OUTPUT;
    const i = stage.inputs.indexOf(net);
    if (i >= 0) return ROLE_INPUT - i;
    const local = this.local;
    for (let x = 0; x < this.localCount; x++) if (local[x] === net) return x;
    if (this.localCount === local.length) {
      this.local = new Int32Array(2 * local.length);
      this.local.set(local);
    }
    this.local[this.localCount] = net;
    return this.localCount++;
  }

  private shape(n: Network | null): void {
    if (!n) return this.push(TAG_NONE);
    if (n.kind === 'leaf') {
      this.push(TAG_LEAF);
      this.push(n.element);
      this.push(this.role(n.a));
      this.push(this.role(n.b));
      return;
    }
    this.push(n.kind === 'parallel' ? TAG_PARALLEL : TAG_SERIES);
    this.push(n.children.length);
    for (let i = 0; i < n.children.length; i++) this.shape(n.children[i]);
    if (n.kind === 'series') {
      this.push(n.nodes.length);
      for (let i = 0; i < n.nodes.length; i++) this.push(this.role(n.nodes[i]));
    }
  }
}

const encoder = new SignatureEncoder();

function solveStage(env: StageEnvironment, stage: Stage, memo: DesignMemo): CachedStage {
  const inputs: CachedStage['inputs'] = [];
  stage.inputs.forEach((input, inputIndex) => {
    const cases = sensitisingCases(env, stage, input);
    if (!cases.length) return;
    const corners: CachedStage['inputs'][number]['corners'] = [];
    for (const corner of env.deck.corners) {
      const resolver = resolverFor(memo, env.design, corner, env.deck.useNetlistModels);
      const solved: CachedCase[] = [];
      let models: ModelUse[] = [];
      for (const held of cases) {
        const built = stageCircuit(env, stage, input, held, resolver, corner.vdd, memo);
        models = built.models;
        let result = memo.transfers.get(built.key);
        if (result) memo.stats.hits++;
        else {
          result = analyseTransfer(built.circuit);
          memo.transfers.set(built.key, result);
          memo.stats.solves++;
        }
        solved.push({ held: held.map((h) => ({ input: stage.inputs.indexOf(h.net), high: h.high })), result });
      }
      let worstMargin = 0;
      let weakestGain = 0;
      solved.forEach((c, i) => {
        if (marginOf(c.result) < marginOf(solved[worstMargin].result)) worstMargin = i;
        if (Math.abs(c.result.gainAtVm) < Math.abs(solved[weakestGain].result.gainAtVm)) weakestGain = i;
      });
      corners.push({ corner: corner.name, vdd: corner.vdd, cases: solved, worstMargin, weakestGain, models });
    }
    inputs.push({ input: inputIndex, corners });
  });
  return { inputs };
}

/**
 * A stage's analysis, read through to the memo shared by every stage of the same signature: the
 * per-input, per-corner objects are built when asked for, not kept for each of a flat netlist's stages.
 */
class StageAnalysisView implements StageAnalysis {
  constructor(
    readonly stage: Stage,
    private readonly cached: CachedStage | null,
    readonly skipped: string | null,
  ) {}

  get inputs(): InputAnalysis[] {
    if (!this.cached) return [];
    const out: InputAnalysis[] = [];
    for (let i = 0; i < this.cached.inputs.length; i++) out.push(this.inputAt(i));
    return out;
  }

  input(net: number): InputAnalysis | undefined {
    if (!this.cached) return undefined;
    const nets = this.stage.inputs;
    for (let i = 0; i < this.cached.inputs.length; i++) if (nets[this.cached.inputs[i].input] === net) return this.inputAt(i);
    return undefined;
  }

  weakestGain(): StageExtreme | null {
    if (!this.cached) return null;
    if (this.cached.weakest === undefined) this.cached.weakest = weakestAt(this.cached);
    return this.extremeAt(this.cached.weakest);
  }

  smallestMargin(): StageExtreme | null {
    if (!this.cached) return null;
    if (this.cached.narrowest === undefined) this.cached.narrowest = narrowestAt(this.cached);
    return this.extremeAt(this.cached.narrowest);
  }

  private extremeAt(at: ExtremeAt | null): StageExtreme | null {
    return at ? new ExtremeView(this.cached!.inputs[at.input], at, this.stage.inputs) : null;
  }

  private inputAt(i: number): InputAnalysis {
    const ci = this.cached!.inputs[i];
    const nets = this.stage.inputs;
    return { input: nets[ci.input], corners: netFreeViews(ci, nets) ?? cornerViews(ci.corners, nets) };
  }
}

class ExtremeView implements StageExtreme {
  readonly input: number;
  readonly value: number;
  constructor(
    private readonly cached: CachedStage['inputs'][number],
    private readonly at: ExtremeAt,
    private readonly nets: readonly number[],
  ) {
    this.input = nets[cached.input];
    this.value = at.value;
  }

  get corner(): CornerAnalysis {
    const shared = netFreeViews(this.cached, this.nets);
    return shared ? shared[this.at.corner] : cornerViews(this.cached.corners.slice(this.at.corner, this.at.corner + 1), this.nets)[0];
  }
}

/** No held inputs: nothing net-specific below the input, so every stage of the signature shares one set of corner objects. */
function netFreeViews(ci: CachedStage['inputs'][number], nets: readonly number[]): CornerAnalysis[] | null {
  if (ci.netFree === undefined) ci.netFree = ci.corners.every((c) => c.cases.every((x) => x.held.length === 0)) ? cornerViews(ci.corners, nets) : null;
  return ci.netFree;
}

function cornerViews(cachedCorners: CachedStage['inputs'][number]['corners'], nets: readonly number[]): CornerAnalysis[] {
  const corners: CornerAnalysis[] = [];
  for (const c of cachedCorners) {
    const cases: TransferCase[] = [];
    for (const x of c.cases) {
      const held: HeldInput[] = [];
      for (const h of x.held) held.push({ net: nets[h.input], high: h.high });
      cases.push({ held, result: x.result });
    }
    corners.push({ corner: c.corner, vdd: c.vdd, cases, worstMargin: cases[c.worstMargin], weakestGain: cases[c.weakestGain], models: c.models });
  }
  return corners;
}

export function analyseStage(env: StageEnvironment, stage: Stage): StageAnalysis {
  if (!STATIC_KINDS.has(stage.kind)) {
    const why = stage.notes.length ? ` (${stage.notes.join('; ')})` : '';
    return new StageAnalysisView(stage, null, `${stage.kind} stage: no static transfer curve${why}`);
  }
  if (!stage.pullUp || !stage.pullDown) return new StageAnalysisView(stage, null, 'networks are not series/parallel');
  if (stage.inputs.length > MAX_ANALYSED_INPUTS) return new StageAnalysisView(stage, null, `${stage.inputs.length} inputs: beyond the ${MAX_ANALYSED_INPUTS} whose held values can be enumerated`);
  const memo = memoOf(env.design);
  let byDeck = memo.stages.get(env.deck);
  if (!byDeck) memo.stages.set(env.deck, (byDeck = new NumberKeyTable<CachedStage>()));
  encoder.encode(env, stage);
  const cached = byDeck.getOrCompute(encoder, () => {
    memo.stats.signatures++;
    return solveStage(env, stage, memo);
  });
  return new StageAnalysisView(stage, cached, cached.inputs.length ? null : 'no input controls the output on its own');
}

/** Vout(Vin) of one stage, swept input and held inputs given, at one corner (exact solves, for chains). */
export function stageTransferFunction(
  env: StageEnvironment,
  stage: Stage,
  swept: number,
  held: readonly HeldInput[],
  corner: Corner,
): (vin: number) => number {
  const resolver = resolverFor(memoOf(env.design), env.design, corner, env.deck.useNetlistModels);
  const solver = new TransferSolver(stageCircuit(env, stage, swept, held, resolver, corner.vdd).circuit);
  return (vin) => solver.vout(vin);
}
