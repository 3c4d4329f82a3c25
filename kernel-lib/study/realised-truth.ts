/**
 * Per-replicate targets of coefficients that estimate realised random effects: when a factor
 * with random truth enters a variant as fixed, its level coefficients (and the intercept) estimate
 * the realised effects of this data set, not the population values.
 */
export { realisedTruth as realisedTruthOf } from '../design/realised-truth';
