export * from './types.js';
export { buildPlan, type PlanContext } from './plan.js';
export { HIGHLIGHT_RULES, RULE_MARKER_PREFIX, ruleFormula, isTailmarkFormula, type RuleRefs } from './rules.js';
export {
  CAUTION,
  FLAG_WORDS,
  NOTES_SHEET_NAME,
  NOTE_HEADER,
  PALETTE,
  REVIEW_STATUSES,
  STATUS_HEADER,
  resultHeaders,
  statusLabel,
  type ReviewState,
} from './style.js';
export { planToJson, type PlanJson } from './json.js';
export { describeDecimal } from './decimal.js';
export {
  LOG_HEADER,
  LOG_MARKER,
  LOG_SHEET_NAME,
  LOG_TITLE,
  NO_NAME,
  cutoffLine,
  isLogMarker,
  lastRunCutoff,
  markLine,
  runLine,
  runLogLines,
  type CutoffChange,
} from './log.js';
