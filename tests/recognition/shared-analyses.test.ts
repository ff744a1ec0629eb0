// What a big flat cell shares instead of rebuilding: the net index and stage lists an engine
// context adopts from its parent's look at the same cell, and the corner views of stages
// whose transfer cases hold no input. Each shared object must be exactly what a context
// built on its own would compute: the check compares against one.

import { describe, expect, it } from 'vitest';
import { defaultDeck } from '../../rules/default-deck';
import { checkDesign } from '../../rules/engine';
import { cellIndex, makeContext, stageEnvironmentOf } from '../../rules/recognition/context';
import { stageAnalysesOf, stageSignature, stagesOf } from '../../rules/stages';
import type { CellContext, RuleModule } from '../../rules/types';
import type { CellIndex } from '../../rules/recognition/context';
import { read } from './support';

// An invented scenario: the "Wendover" slice, a domino gate and inverters in a cell under a clocked top level.
const slice = [
  '.subckt wendover clk a b y z vdd vss',
  'Mpre dyn clk vdd vdd pch w=1.0 l=0.15',
  'Mev1 dyn a s1 vss nch w=0.84 l=0.15',
  'Mev2 s1 b ft vss nch w=0.84 l=0.15',
  'Mft ft clk vss vss nch w=1.26 l=0.15',
  'Mkp dyn y vdd vdd pch w=0.42 l=0.3',
  'Mno y dyn vss vss nch w=0.65 l=0.15',
  'Mpo y dyn vdd vdd pch w=1.0 l=0.15',
  'Mn1 z1 a vss vss nch w=0.65 l=0.15',
  'Mp1 z1 a vdd vdd pch w=1.0 l=0.15',
  'Mn2 z z1 vss vss nch w=0.65 l=0.15',
  'Mp2 z z1 vdd vdd pch w=1.0 l=0.15',
  'Mn3 z2 b vss vss nch w=0.42 l=0.15',
  'Mp3 z2 b vdd vdd pch w=0.84 l=0.15',
  'Mtn z2 clk zz vss nch w=0.42 l=0.15',
  'Mtp z2 clkb zz vdd pch w=0.84 l=0.15',
  '.ends wendover',
];
const top = ['.option scale=1e-6', ...slice, 'Vdd vdd 0 1.8', 'Vss vss 0 0', 'Vclk clk 0 pulse(0 1.8 0 50p 50p 1n 2n)', 'Xs clk a b y z vdd vss wendover', '.end'].join('\n');

function seen(text: string, cellName: string): { ctx: CellContext; findings: number } {
  const deck = defaultDeck();
  const design = read(text, deck);
  let captured: CellContext | null = null;
  const spy: RuleModule = {
    meta: { id: 'test.capture', title: '', area: 'stage', rationale: '', fix: '', defaultSeverity: 'info' },
    params: { parse: () => ({}) } as never,
    check(ctx) {
      if (ctx.cell.name === cellName) captured = ctx;
    },
  };
  const { findings } = checkDesign(design, { ...deck, rules: { ...deck.rules, 'test.capture': { enabled: true, severity: 'info', params: {} } } }, { rules: [spy] });
  return { ctx: captured!, findings: findings.length };
}

const lists = (x: CellIndex) => ({
  channel: [...x.channel.start, -1, ...x.channel.list],
  gates: [...x.gates.start, -1, ...x.gates.list],
  others: [...x.others.start, -1, ...x.others.list],
  pins: [...x.pinInstances.start, -1, ...x.pinInstances.list, -1, ...x.pinPorts.list],
  ports: [...x.isPort],
  alias: [...x.alias],
  inputOf: [...x.inputOf.start, -1, ...x.inputOf.list],
  passAt: [...x.passAt.start, -1, ...x.passAt.list],
  stageOfMos: [...x.stageOfMos],
});

describe('shared analyses of a flat cell under a parent', () => {
  it('the adopted net index and stage lists equal those of a context built on its own under the same rails', () => {
    const { ctx } = seen(top, 'wendover');
    const adopted = cellIndex(ctx);
    // The engine context keeps its own stage list (clock tracing may refine it), never the donor's.
    expect(adopted.stages).toBe(stagesOf(ctx));
    const own = makeContext(ctx.design, ctx.deck, ctx.cell, ctx.rails.slice());
    const fresh = cellIndex(own);
    expect(fresh).not.toBe(adopted);
    expect(lists(adopted)).toEqual(lists(fresh));
    expect(adopted.railOf(ctx.cell.netIndex.get('vdd')!)).toBe('power');
    // Clock tracing refined this context's domino stage, and only in its own list.
    expect(adopted.stages.stages.some((s) => s.kind === 'dynamic')).toBe(true);
  });

  it('stages without held inputs share corner views that equal a stage analysed alone (same VM, gain, margins, input net)', () => {
    const { ctx } = seen(top, 'wendover');
    const analyses = stageAnalysesOf(ctx);
    const net = (n: string) => ctx.cell.netIndex.get(n)!;
    const first = analyses.find((a) => a.stage.output === net('z1'))!;
    const second = analyses.find((a) => a.stage.output === net('z'))!;
    expect(first.inputs[0].input).toBe(net('a'));
    expect(second.inputs[0].input).toBe(net('z1'));
    expect(second.inputs[0].corners).toBe(first.inputs[0].corners);
    // The same inverter alone in a design of its own: its own solve, nothing shared (Rabaey's derived points, computed afresh).
    const alone = ['.option scale=1e-6', '.subckt solo a z vdd vss', 'Mn2 z a vss vss nch w=0.65 l=0.15', 'Mp2 z a vdd vdd pch w=1.0 l=0.15', '.ends solo', '.end'].join('\n');
    const deck = defaultDeck();
    const design = read(alone, deck);
    const cell = design.cells.get('solo')!;
    const solo = stageAnalysesOf(makeContext(design, deck, cell, cell.nets.map((n) => (n === 'vdd' ? 'power' : n === 'vss' ? 'ground' : undefined))));
    const ref = solo[0].inputs[0].corners;
    const got = second.inputs[0].corners;
    expect(got.length).toBe(ref.length);
    for (let i = 0; i < ref.length; i++) {
      const [r, g] = [ref[i].worstMargin.result, got[i].worstMargin.result];
      expect(got[i].corner).toBe(ref[i].corner);
      expect(g.vm).toBe(r.vm);
      expect(g.gainAtVm).toBe(r.gainAtVm);
      expect(g.nmh).toBe(r.nmh);
      expect(g.nml).toBe(r.nml);
      expect(got[i].worstMargin.held).toEqual([]);
    }
  });
});

describe('stage signatures (the key under which stages share one analysis)', () => {
  // Two-input NANDs in the style of any static CMOS library: equal structure on other nets must share a key,
  // and any change the DC curve depends on (a width, a length, a multiplier, the model, a gate's or body's role, the topology) must not.
  const nandLines = (tag: string, a: string, b: string, y: string, over: Record<string, string> = {}) => [
    `Mna${tag} ${y} ${a} s${tag} ${over.bulk ?? 'vss'} ${over.model ?? 'nch'} w=${over.w ?? '0.65'} l=${over.l ?? '0.15'} m=${over.m ?? '1'}`,
    `Mnb${tag} s${tag} ${over.gateB ?? b} vss vss nch w=0.65 l=0.15`,
    `Mpa${tag} ${y} ${a} vdd vdd pch w=0.42 l=0.15`,
    `Mpb${tag} ${y} ${over.gateB ?? b} vdd vdd pch w=0.42 l=0.15`,
  ];
  const signatureOf = (lines: string[], out: string) => {
    const text = ['.option scale=1e-6', '.subckt sig a b c d y1 y2 vdd vss', ...lines, '.ends sig', '.end'].join('\n');
    const deck = defaultDeck();
    const design = read(text, deck);
    const cell = design.cells.get('sig')!;
    const ctx = makeContext(design, deck, cell, cell.nets.map((x) => (x === 'vdd' ? 'power' : x === 'vss' ? 'ground' : undefined)));
    const stage = stagesOf(ctx).stages.find((s) => s.output === cell.netIndex.get(out))!;
    return stageSignature(stageEnvironmentOf(ctx), stage);
  };
  it('equal for equal structure on other nets, different for every change a transfer curve depends on', () => {
    const reference = signatureOf([...nandLines('1', 'a', 'b', 'y1'), ...nandLines('2', 'c', 'd', 'y2')], 'y1');
    expect(signatureOf([...nandLines('1', 'a', 'b', 'y1'), ...nandLines('2', 'c', 'd', 'y2')], 'y2')).toBe(reference);
    const variants: Record<string, string>[] = [{ w: '0.84' }, { l: '0.18' }, { m: '2' }, { model: 'nch_lvt' }, { bulk: 'vdd' }, { gateB: 'a' }];
    const keys = variants.map((over) => signatureOf(nandLines('1', 'a', 'b', 'y1', over), 'y1'));
    for (const k of keys) expect(k).not.toBe(reference);
    expect(new Set(keys).size).toBe(keys.length);
  });
});
