/** The estimate step of each response family (see ./types.ts for the contract). */
import type { FamilyName } from '../../family/index';
import { estimateNormal } from './normal';
import { countEstimateStep } from './count';
import type { EstimateStep } from './types';

export const ESTIMATE_STEPS: Readonly<Partial<Record<FamilyName, EstimateStep>>> = {
  gaussian: estimateNormal,
  poisson: countEstimateStep('poisson'),
  binomial: countEstimateStep('binomial'),
  'negative-binomial': countEstimateStep('negative-binomial'),
};
