// Plot builders: rows in, Vega-Lite v5 spec out (pure, deterministic, data inlined).

// Simulation study
export { metricVsScenario } from './metric-vs-scenario';
export type { MetricVsScenarioOptions } from './metric-vs-scenario';
export { sdRecovery } from './sd-recovery';
export type { SdRecoveryOptions } from './sd-recovery';

// One survey and one fit
export { groupData } from './group-data';
export type { GroupDataOptions } from './group-data';
export { predictedGroupEffects } from './predicted-group-effects';
export type { GroupEffectRow, PredictedGroupEffectsOptions } from './predicted-group-effects';
export { residualsVsFitted } from './residuals-vs-fitted';
export type { ResidualsVsFittedOptions } from './residuals-vs-fitted';
export { normalQuantilePlot } from './normal-quantile';
export type { NormalQuantileOptions } from './normal-quantile';
export { fixedEffectsCompare } from './fixed-effects-compare';
export type { FixedEffectsCompareOptions, NamedFit } from './fixed-effects-compare';

export type { FieldTitles, VegaLiteSpec } from './types';
