// Which parameter values a device is analysed with: the deck corner's, or, for devices
// that name a `.model` card carrying level-1 values (VTO, KP, LAMBDA, GAMMA, PHI),
// the card's — unless the deck turns netlist models off. Every value keeps its source
// so reports can say where it came from.

import type { ModelCard } from '../../grammar/design';
import type { Corner, DeviceParams } from '../../shared/deck';
import type { MosModel, Polarity } from './mos';

export type ModelParameter = 'vt0' | 'kPrime' | 'lambda' | 'gamma' | 'phi2F';

export interface ParameterSource {
  from: 'corner' | 'model-card';
  /** Corner name or model card name. */
  name: string;
}

export interface ResolvedModel {
  model: MosModel;
  /** Source of each value a model card can override; VDSAT and the per-µm capacitances and leakage always come from the corner. */
  sources: Record<ModelParameter, ParameterSource>;
  /** The corner's per-polarity values (capacitance and leakage per µm). */
  corner: DeviceParams;
}

const CARD_KEYS: [ModelParameter, string][] = [
  ['vt0', 'vto'],
  ['kPrime', 'kp'],
  ['lambda', 'lambda'],
  ['gamma', 'gamma'],
  ['phi2F', 'phi'],
];

/** A card is read for level-1 values when it is a MOS card of level 1 (or no level, which SPICE reads as 1). */
export function levelOneCard(card: ModelCard | undefined): card is ModelCard {
  if (!card || (card.type !== 'nmos' && card.type !== 'pmos')) return false;
  const level = card.params.level;
  return level === undefined || level === 1;
}

export function resolveModel(
  polarity: Polarity,
  modelName: string,
  corner: Corner,
  models: ReadonlyMap<string, ModelCard>,
  useNetlistModels: boolean,
): ResolvedModel {
  const base = polarity === 'n' ? corner.nmos : corner.pmos;
  const model: MosModel = {
    polarity,
    kind: corner.model,
    vt0: base.vt0,
    kPrime: base.kPrime,
    lambda: base.lambda,
    gamma: base.gamma,
    phi2F: base.phi2F,
    vdsat: base.vdsat,
  };
  const fromCorner: ParameterSource = { from: 'corner', name: corner.name };
  const sources = Object.fromEntries(CARD_KEYS.map(([k]) => [k, fromCorner])) as Record<ModelParameter, ParameterSource>;
  const card = useNetlistModels ? models.get(modelName.toLowerCase()) : undefined;
  if (levelOneCard(card)) {
    const fromCard: ParameterSource = { from: 'model-card', name: card.name };
    for (const [key, cardKey] of CARD_KEYS) {
      const value = card.params[cardKey];
      if (value === undefined || !Number.isFinite(value)) continue;
      // SPICE writes a p-channel enhancement threshold as a negative VTO; the model here keeps n-equivalent thresholds.
      model[key] = key === 'vt0' && polarity === 'p' ? -value : value;
      sources[key] = fromCard;
    }
  }
  return { model, sources, corner: base };
}

/** Memoises `resolveModel` for one corner and one design's cards. */
export class ModelResolver {
  private readonly cache = new Map<string, ResolvedModel>();
  constructor(
    readonly corner: Corner,
    private readonly models: ReadonlyMap<string, ModelCard>,
    private readonly useNetlistModels: boolean,
  ) {}

  get(polarity: Polarity, modelName: string): ResolvedModel {
    const key = polarity + '|' + modelName.toLowerCase();
    let hit = this.cache.get(key);
    if (!hit) {
      hit = resolveModel(polarity, modelName, this.corner, this.models, this.useNetlistModels);
      this.cache.set(key, hit);
    }
    return hit;
  }

  /** Every resolution made so far, keyed `polarity|model`. */
  resolved(): ReadonlyMap<string, ResolvedModel> {
    return this.cache;
  }
}

/** Human-readable summary of where values came from: "VT0, k′ from .model nch; λ, γ, 2φF from corner tt". */
export function describeSources(sources: Record<ModelParameter, ParameterSource>): string {
  const labels: Record<ModelParameter, string> = { vt0: 'VT0', kPrime: 'k′', lambda: 'λ', gamma: 'γ', phi2F: '2φF' };
  const groups = new Map<string, string[]>();
  for (const key of Object.keys(labels) as ModelParameter[]) {
    const s = sources[key];
    const where = s.from === 'corner' ? `corner ${s.name}` : `.model ${s.name}`;
    groups.set(where, [...(groups.get(where) ?? []), labels[key]]);
  }
  return [...groups].map(([where, keys]) => `${keys.join(', ')} from ${where}`).join('; ');
}
