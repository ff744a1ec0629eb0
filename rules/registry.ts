// Every rule Keepwell knows, in the order reports list them.
import type { RuleModule } from './types';
import implausibleSize from './device/implausible-size';
import stageNonRegenerative from './stage/non-regenerative';
import stageNoiseMargin from './stage/noise-margin';

export const ruleRegistry: readonly RuleModule[] = [implausibleSize, stageNonRegenerative, stageNoiseMargin] as unknown as readonly RuleModule[];

export function findRule(id: string): RuleModule | undefined {
  return ruleRegistry.find((r) => r.meta.id === id);
}
