export * from './types.js';
export { buildPlan, METHOD_NAMES, type PlanContext } from './plan.js';
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
  widthToShow,
  type ReviewState,
} from './style.js';
export { planToJson, planJsonChunks, type PlanJson } from './json.js';
export { describeDecimal } from './decimal.js';
export {
  LOG_HEADER,
  LOG_SHEET_NAME,
  NO_NAME,
  cutoffLine,
  isLogMarker,
  lastRunCutoff,
  markLine,
  runLine,
  runLogLines,
  type CutoffChange,
} from './log.js';
export { WORKBOOK_FORMAT, NOTES_TITLE, LOG_TITLE, notesFormatOf, logFormatOf, notesGrid, type NotesGrid } from './notesSheet.js';
export { MARKS_TITLE, GONE_TITLE, isMark, mergeMarks, priorMarksOf, readMarkRecords, type MarkRecord, type MarksOutcome, type PriorMarks } from './marks.js';
