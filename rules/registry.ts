// Every rule Keepwell knows, in the order reports list them.
import type { RuleModule } from './types';
import implausibleSize from './device/implausible-size';

export const ruleRegistry: readonly RuleModule[] = [implausibleSize] as unknown as readonly RuleModule[];

export function findRule(id: string): RuleModule | undefined {
  return ruleRegistry.find((r) => r.meta.id === id);
}
