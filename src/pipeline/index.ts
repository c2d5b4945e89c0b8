/** The pipeline's public face: settings, the one user-facing error type, and the run. */
export { TailmarkError, isTailmarkError, ERROR_CODES, type ErrorCode } from './errors.js';
export {
  SETTING_KEYS,
  SETTING_SPECS,
  defaultSettings,
  engineOptions,
  settingsFromSaved,
  validateSettings,
  type SettingKey,
  type SettingWords,
  type Settings,
  type SettingsInput,
} from './settings.js';
export { columnsToRead, findColumn, resolveColumns, type ResolvedColumns } from './columns.js';
export { claimIds, runPipeline, scoreColumns, type NamedCells, type PipelineContext, type PipelineRun, type PipelineTable } from './run.js';
export { cutoffForReviewBudget, type BudgetAnswer } from './budget.js';
export {
  createWorkerPipeline,
  runPipelineYielding,
  servePipeline,
  transferablesOf,
  type AsyncPipeline,
  type FromWorker,
  type PipelineJob,
  type PipelinePhase,
  type PipelinePort,
  type ToWorker,
} from './offthread.js';
export { fillMergedKeys, mergedUncheckedNote, type MergedArea } from './merged.js';
