// Every rule Keepwell knows, in the order reports list them.
import type { RuleModule } from './types';
import implausibleSize from './device/implausible-size';
import stageNonRegenerative from './stage/non-regenerative';
import stageNoiseMargin from './stage/noise-margin';
import dynamicNoKeeper from './dynamic/no-keeper';
import dynamicKeeperRatio from './dynamic/keeper-ratio';
import dynamicPhaseMismatch from './dynamic/phase-mismatch';
import dynamicCascadeMonotonicity from './dynamic/cascade-monotonicity';
import dynamicChargeSharing from './dynamic/charge-sharing';
import dynamicCouplingNoise from './dynamic/coupling-noise';
import dynamicOutputLoad from './dynamic/output-load';
import stageRatioedLogic from './stage/ratioed-logic';
import chainNonRestoring from './chain/non-restoring';
import chainThresholdDrop from './chain/threshold-drop';
import netFloatingGate from './net/floating-gate';
import netNoDcPath from './net/no-dc-path';
import deviceBulkTie from './device/bulk-tie';

export const ruleRegistry: readonly RuleModule[] = [
  implausibleSize,
  stageNonRegenerative,
  stageNoiseMargin,
  stageRatioedLogic,
  dynamicNoKeeper,
  dynamicKeeperRatio,
  dynamicPhaseMismatch,
  dynamicCascadeMonotonicity,
  dynamicChargeSharing,
  dynamicCouplingNoise,
  dynamicOutputLoad,
  chainNonRestoring,
  chainThresholdDrop,
  netFloatingGate,
  netNoDcPath,
  deviceBulkTie,
] as unknown as readonly RuleModule[];

export function findRule(id: string): RuleModule | undefined {
  return ruleRegistry.find((r) => r.meta.id === id);
}
