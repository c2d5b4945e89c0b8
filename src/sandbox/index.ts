/**
 * Public entry of the sandbox: an in-memory workbook implementing, strictly, the Excel JavaScript
 * API members Tailmark uses. Imports nothing else of Tailmark; runs in Node and in the browser.
 * The exceljs bridge lives in './exceljs-bridge.js' (import it separately so the base bundle stays small).
 *
 * Usage: `const sb = sandboxFromRows('Claims', rows); await sb.run(async (context) => { ... })`;
 * `sb.run` has Excel.run's shape (also `run(object, batch)`), so a layer written against
 * Excel.run can be handed `sb.run`.
 *
 * Where the sandbox deliberately differs from Excel (or models only part of it):
 * - A failed sync leaves the statements before the failing one applied, as Excel does (nothing
 *   loaded becomes readable); `partialOnError: false` makes it apply nothing instead.
 * - Payload sizes are the UTF-8 JSON size of the sandbox's own encoding of statements and loaded
 *   data, not Office.js's wire format: close, not equal. Request over the limit:
 *   RequestPayloadSizeLimitExceeded; response over it: ResponsePayloadSizeLimitExceeded (both are
 *   Excel error codes; the response one is in Excel.ErrorCodes).
 * - Range objects bind to their cells when first used in a sync and do not move when cells are
 *   inserted or deleted later (Excel's may).
 * - Formula cells: Range.values returns the cached result when one is known (imported files),
 *   else the result of the sandbox's small evaluator, else the formula text (valueType String).
 *   There is no recalculation engine.
 * - valueTypes reports "Double" for every number (Excel reports "Double" for numbers in practice;
 *   "Integer" is never produced) and never "Unknown"/"RichValue".
 * - Typed-input interpretation of strings (numbers, "(120)", "12%", TRUE, "#N/A", ISO dates) is
 *   en-US only; other date spellings stay text.
 * - Only Custom conditional formats, list data validation, solid fills, font colour/bold, wrap,
 *   number formats and column widths are modelled; other types fail with NotImplemented.
 * - Sheet protection blocks every cell, format, rule, validation and table write on the sheet
 *   (Excel honours locked/unlocked cells and protection options); `protect()` on a protected sheet
 *   fails with InvalidOperation.
 * - Insert/delete rewrite same-sheet references in cell formulas, rule formulas and list sources;
 *   references from other sheets are not rewritten. Rule and validation ranges split when a shift
 *   covers part of them; a shift that would move part of a table fails with InvalidOperation.
 * - Clear("Formats"/"All") also removes conditional formats in the cleared cells; "All" also removes
 *   validation (as the Excel UI's Clear does).
 * - TableColumnCollection.add shifts cells right within the table rows; Excel may reuse an empty
 *   adjacent column. Table.delete clears the table's cells; convertToRange keeps them.
 * - autofitColumns estimates width from text length (7 pt per character + 5), not rendered glyphs.
 * - Events: only workbook.onSelectionChanged; handlers fire after the Excel.run that changed the
 *   selection (or on `userSelect`), asynchronously; `flushEvents()` awaits them.
 * - Objects of a finished run cannot queue work (InvalidRequestContext) unless the run is resumed
 *   with `run(object, batch)`.
 * - `snapshot()` is O(cells) and meant for test-sized sheets (about 5 microseconds per stored cell).
 */
export { SandboxWorkbook, sandboxFromRows } from './workbook.js';
export type { SandboxStats, ByteStats, SandboxCellInput, SelectionHandler, SandboxRun } from './workbook.js';
export { diffSnapshots } from './snapshot.js';
export type { CellSnapshot, SheetSnapshot, SandboxSnapshot } from './snapshot.js';
export type { SandboxOptions } from './context.js';
export { SandboxContext, SandboxClientResult } from './context.js';
export { SandboxError, isSandboxError } from './errors.js';
export type { SandboxErrorCode, SandboxDebugInfo } from './errors.js';
export { CellError } from './formula.js';
export { evaluateFormula, FormulaUnsupportedError, rewriteReferences } from './formula.js';
export { parseAddress, formatAddress, formatRect, columnLetters, columnIndex, MAX_ROWS, MAX_COLS } from './address.js';
export type { Rect, ParsedAddress } from './address.js';
