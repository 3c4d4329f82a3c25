// Small helpers for the notebooks in notebooks/: tables and sentences from library results.
export { columnOverview, columnRoles, checkSurveyColumns, columnsToRecords } from './survey-columns';
export type { ColumnOverviewRow, SurveyColumns } from './survey-columns';
export { factorRows, pairRows, surveySentences, FEW_LEVELS } from './survey-in-words';
export type { FactorRow, PairRow } from './survey-in-words';
export { withGroupAs, withInterval, modelColumns, modelNesting } from './model-variants';
export { fixedEffectRows, varianceRows, fitStatusRows } from './fit-tables';
export type { NamedFitResult, FixedEffectTableRow } from './fit-tables';
export {
  SMALL_SAMPLE_PREFERENCE, smallSampleMethod, withIntervalVariants, coverageVerdicts, favouredInterval,
} from './study-reading';
export type { CoverageVerdictRow, IntervalChoice } from './study-reading';
export { studyFolderName } from './study-folder-name';
export { studyProgressLines } from './study-progress';
export type { StudyProgressLines } from './study-progress';
export { metricTable } from './metric-table';
export { cellCounts, cellCountChart } from './cell-counts';
export type { CellCountRow } from './cell-counts';
export { surveyTable, fixedEffectsTable, groupSdTable, groupEffectsTable, replicatesTable, metricsTable, groupEffectRows } from './tables';
