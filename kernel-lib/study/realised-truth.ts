import type { SimulatedData } from '../design/simulate';
import type { ResolvedVariant } from '../design/types';

/**
 * Per-replicate targets of coefficients that estimate realised random effects (a factor with
 * random truth entered as fixed). Until the design layer provides them, none: such coefficients
 * are compared with the design truth.
 */
export function realisedTruthOf(variant: ResolvedVariant, data: SimulatedData): Record<string, number> {
  void variant;
  void data;
  return {};
}
