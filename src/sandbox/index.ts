/**
 * Public entry of the sandbox: an in-memory workbook implementing, strictly, the Excel JavaScript
 * API members Tailmark uses. Imports nothing else of Tailmark; runs in Node and in the browser.
 * The exceljs bridge lives in './exceljs-bridge.js' (import it separately so the base bundle stays small).
 */
export { SandboxWorkbook, sandboxFromRows, diffSnapshots } from './workbook.js';
export type { SandboxStats, ByteStats, SandboxCellInput, CellSnapshot, SheetSnapshot, SandboxSnapshot, SelectionHandler, SandboxRun } from './workbook.js';
export type { SandboxOptions } from './context.js';
export { SandboxContext, SandboxClientResult } from './context.js';
export { SandboxError, isSandboxError } from './errors.js';
export type { SandboxErrorCode, SandboxDebugInfo } from './errors.js';
export { CellError } from './formula.js';
export { evaluateFormula, FormulaUnsupportedError, rewriteReferences } from './formula.js';
export { parseAddress, formatAddress, formatRect, columnLetters, columnIndex, MAX_ROWS, MAX_COLS } from './address.js';
export type { Rect, ParsedAddress } from './address.js';
