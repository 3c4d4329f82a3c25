// Quadrat's public API: what notebooks, scripts and the command line use.
// Import it in notebook cells as `./kernel-lib/index` (the kernel resolves files, not folders).

// Model description
export type { ModelSpec, ResolvedModel, GroupSpec, FixedTerm, GroupRole, Estimation } from './model/types';
export { parseModel, modelToJson } from './model/parse';
export { QuadratInputError } from './model/errors';

// Survey data
export { readCsvFile, parseCsv } from './data/csv';
export { toColumns, columnsFromRecords, columnsFromTable } from './data/columns';
export type { Columns, TableLike } from './data/columns';
export { buildDesign } from './data/build-design';
export { describeSurvey } from './data/describe-survey';
export type { SurveySummary, FactorSummary, FactorPairSummary } from './data/describe-survey';

// Fitting
export { fitModel } from './analyse/fit-model';
export type { SurveyData } from './analyse/fit-model';
export { fitDesign, INTERVAL_METHODS } from './fit/fit-design';
export type { FitOptions, IntervalMethod } from './fit/fit-design';
export { remlComparisonCaution } from './fit/comparison';
export type { FitResult, FixedEffectRow, VarianceComponentRow, CorrelationRow, ConditionalModeRow, ResponseSummary } from './fit/result';
export { responseScaleEstimates, groupPredictions } from './fit/rate-and-odds-ratios';
export type { ResponseScaleRow, GroupPredictionRow } from './fit/rate-and-odds-ratios';
export type { DesignMatrices, RandomTerm } from './data/design-matrices';
export { contrastTest, termTest, termCoefficients, likelihoodRatioTest, bootstrapFit } from './fit/inference/index';
export type { ContrastTestResult, TermTestKind, TermTestResult, LikelihoodRatioTest, BootstrapFitOptions } from './fit/inference/index';

// Survey designs and simulation
export { parseDesign } from './design/parse';
export { expandGrid } from './design/grid';
export type { Scenario } from './design/grid';
export { simulateColumns } from './design/simulate';
export { designFromSurvey } from './design/from-survey';
export type { SurveyDesign, SurveyDesignSpec } from './design/types';
export { createStream } from './random/stream';
export type { Stream } from './random/stream';

// Studies
export { runStudy, studyFingerprint, DEFAULT_BATCH_SIZE } from './study/run-study';
export type { RunStudyOptions, RunStudyResult, StudyProgress } from './study/run-study';
export { ReplicateRunner } from './study/replicate-runner';
export { summarise } from './study/metrics';
export type { MetricRow } from './study/metrics';
export { formatMetric } from './study/format-metric';
export { toWideTable } from './study/wide-table';
export type { ReplicateRow } from './study/replicate-row';
export { mergeShards } from './study/merge-shards';
export { withScenarioFields, gridFields, scenarioFieldName } from './study/scenario-fields';
export {
  readStudy, readingMarkdown, readingText, judgeCoverage, defaultTolerance, percentWithError, READING_CAUTIONS,
} from './study/reading';
export type { StudyReading, CellReading, CoverageJudgement, CoverageClass, ReadingOptions } from './study/reading';
export { runPlan, planSentence } from './study/plan-run';
export type { PlanResult, RunPlanOptions } from './study/plan-run';
export { parsePlan, GOAL_METRICS } from './study/plan-spec';
export { planFromPilot } from './study/plan-pilot';
export type { PilotPlan, PilotPlanCase, PilotPlanOptions } from './study/plan-pilot';
export type { PlanSpec, PlanGoal } from './study/plan-spec';
export { planCurve } from './plots/plan-curve';
export type { PlanCurvePoint, PlanCurveOptions } from './plots/plan-curve';
export { planReportHtml, planCurveSpecs } from './display/plan-report';

// Plots (rows in, Vega-Lite spec out) and display
export * from './plots/index';
export * from './display/index';
export { readStudyFolder, studyReportHtml, studyChartSections } from './display/study-report';
export type { StudyResults } from './display/study-report';
export * from './notebook/index';

// Types that the functions above take or return (so the API reference can link them)
export type { CsvOptions } from './data/csv';
export type { DerivedDesign, DesignFromSurveyOptions } from './design/from-survey';
export type { SimulatedData } from './design/simulate';
export type { CovariateSpec, FactorSpec, GridAxis, GridValue, ResolvedCovariate, ResolvedFactor, ResolvedTruth, ResolvedVariant, TruthSpec, UnequalSpec, VariantSpec } from './design/types';
export type { BootstrapSummary } from './fit/inference/bootstrap';
export type { TestMethod } from './fit/inference/contrast-test';
export type { BootstrapSettings } from './fit/inference/intervals';
export type { QuadratInputErrorDetails } from './model/errors';
export type { CategoricalTerm, Integration, MissingPolicy, ResponseFamilyName } from './model/types';
export type { KeyPart } from './random/stream';
export type { Shard } from './study/batch-plan';
export type { MetricName, SummariseOptions } from './study/metrics';
export type { Probe } from './study/plan-search';
export type { VariantCell } from './study/reading';
export type { ReplicateKind, ReplicateStatus } from './study/replicate-row';
export type { StudyManifest } from './study/study-folder';
export type { WideRow } from './study/wide-table';
// Types that exported types refer to, so the API reference documents them too.
export type { PercentileInterval } from './fit/inference/bootstrap';
export type { BetweenSpec, NormalSpec, UniformSpec, RandomTruth, TruthTerm, TruthPart, TrialsRangeSpec } from './design/types';
export type { ColumnRole } from './data/design-matrices';
export type { FamilyName } from './family/types';
export type { GoalLook, Verdict } from './study/plan-search';
export type { RealisedEffects } from './design/simulate';
