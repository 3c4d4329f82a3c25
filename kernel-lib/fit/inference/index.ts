/** Small-sample inference for fixed effects and intervals for variance components. */
export { contrastTest, termTest, termCoefficients, type ContrastTestResult, type TestMethod, type TermTestKind, type TermTestResult } from './contrast-test';
export { likelihoodRatioTest, type LikelihoodRatioTest } from './likelihood-ratio';
export { bootstrapFit, type BootstrapFitOptions } from './bootstrap-fit';
export { contextFromFit, type InferenceContext } from './context';
export { profileFixedEffects, profileVariance, varianceTargets, type ProfileInterval, type VarianceTarget } from './profile';
export { SMALL_SAMPLE_METHODS, type BootstrapSettings, type SmallSampleMethod } from './intervals';
