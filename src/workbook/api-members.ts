/**
 * Every Excel JavaScript API member the workbook layer (src/workbook/*.ts) uses, with the
 * requirement set that @types/office-js states for it ("[Api set: ExcelApi 1.x]" in the doc
 * comment). `apiSet: null` marks members of the proxy model itself (load, items, sync,
 * isNullObject, event registration objects) for which the typings state no set.
 *
 * test/workbook/api-members.test.ts finds the members actually used (with the TypeScript checker)
 * and fails when one is missing here or its set differs from the typings.
 */
export interface ExcelMember {
  /** "Class.member" ("OfficeExtension.Class.member" for OfficeExtension classes). */
  readonly member: string;
  readonly apiSet: string | null;
  /** Used only where a requirement check says the host has it: not counted in the manifest's MinVersion. */
  readonly featureDetected?: true;
}

export const EXCEL_MEMBERS: readonly ExcelMember[] = [
  // Reading back and writing back what a run changes (backup.ts, undo.ts).
  { member: 'Workbook.load', apiSet: null },
  { member: 'Workbook.protection', apiSet: 'ExcelApi 1.7' },
  { member: 'Workbook.readOnly', apiSet: 'ExcelApi 1.8' },
  { member: 'WorkbookProtection.load', apiSet: null },
  { member: 'WorkbookProtection.protected', apiSet: 'ExcelApi 1.7' },
  { member: 'CellPropertiesFill.color', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFillLoadOptions.color', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFont.bold', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFont.color', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFontLoadOptions.bold', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFontLoadOptions.color', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFormat.fill', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFormat.font', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFormat.wrapText', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFormatLoadOptions.fill', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFormatLoadOptions.font', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesFormatLoadOptions.wrapText', apiSet: 'ExcelApi 1.9' },
  { member: 'CellPropertiesLoadOptions.format', apiSet: 'ExcelApi 1.9' },
  { member: 'ConditionalFormat.getRangeOrNullObject', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalFormat.load', apiSet: null },
  { member: 'ConditionalFormat.priority', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalFormat.stopIfTrue', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalRangeFill.load', apiSet: null },
  { member: 'ConditionalRangeFont.load', apiSet: null },
  { member: 'DataValidation.ignoreBlanks', apiSet: 'ExcelApi 1.8' },
  { member: 'DataValidation.load', apiSet: null },
  { member: 'DataValidation.type', apiSet: 'ExcelApi 1.8' },
  { member: 'OfficeExtension.ClientResult.value', apiSet: null },
  { member: 'Range.formulas', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.getCellProperties', apiSet: 'ExcelApi 1.9' },
  { member: 'Range.setCellProperties', apiSet: 'ExcelApi 1.9' },
  { member: 'RangeFill.clear', apiSet: 'ExcelApi 1.1' },
  { member: 'RangeFormat.load', apiSet: null },
  { member: 'SettableCellProperties.format', apiSet: 'ExcelApi 1.9' },
  { member: 'ConditionalFormat.custom', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalFormat.delete', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalFormat.type', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalFormatCollection.add', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalFormatCollection.items', apiSet: null },
  { member: 'ConditionalFormatCollection.load', apiSet: null },
  { member: 'ConditionalFormatRule.formula', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalFormatRule.load', apiSet: null },
  { member: 'ConditionalRangeFill.color', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalRangeFont.color', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalRangeFormat.fill', apiSet: 'ExcelApi 1.6' },
  { member: 'ConditionalRangeFormat.font', apiSet: 'ExcelApi 1.6' },
  { member: 'CustomConditionalFormat.format', apiSet: 'ExcelApi 1.6' },
  { member: 'CustomConditionalFormat.rule', apiSet: 'ExcelApi 1.6' },
  { member: 'DataValidation.clear', apiSet: 'ExcelApi 1.8' },
  { member: 'DataValidation.rule', apiSet: 'ExcelApi 1.8' },
  { member: 'DataValidationRule.list', apiSet: 'ExcelApi 1.8' },
  { member: 'ListDataValidation.inCellDropDown', apiSet: 'ExcelApi 1.8' },
  { member: 'ListDataValidation.source', apiSet: 'ExcelApi 1.8' },
  { member: 'OfficeExtension.ClientObject.isNullObject', apiSet: null },
  { member: 'OfficeExtension.ClientRequestContext.sync', apiSet: null },
  { member: 'OfficeExtension.ClientRequestContext.trackedObjects', apiSet: null },
  { member: 'OfficeExtension.EventHandlerResult.context', apiSet: null },
  { member: 'OfficeExtension.EventHandlerResult.remove', apiSet: null },
  { member: 'OfficeExtension.EventHandlers.add', apiSet: null },
  { member: 'OfficeExtension.TrackedObjects.remove', apiSet: null },
  { member: 'Range.address', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.clear', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.columnCount', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.columnIndex', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.conditionalFormats', apiSet: 'ExcelApi 1.6' },
  { member: 'Range.dataValidation', apiSet: 'ExcelApi 1.8' },
  { member: 'Range.delete', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.format', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.getEntireColumn', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.getIntersectionOrNullObject', apiSet: 'ExcelApi 1.4' },
  { member: 'Range.getMergedAreasOrNullObject', apiSet: 'ExcelApi 1.13', featureDetected: true },
  { member: 'Range.getSurroundingRegion', apiSet: 'ExcelApi 1.7' },
  { member: 'Range.getTables', apiSet: 'ExcelApi 1.9' },
  { member: 'Range.insert', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.load', apiSet: null },
  { member: 'Range.numberFormat', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.rowCount', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.rowIndex', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.select', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.text', apiSet: 'ExcelApi 1.1' },
  { member: 'RangeAreas.areas', apiSet: 'ExcelApi 1.9' },
  { member: 'RangeCollection.items', apiSet: null },
  { member: 'RangeCollection.load', apiSet: null },
  { member: 'Range.values', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.valueTypes', apiSet: 'ExcelApi 1.1' },
  { member: 'Range.worksheet', apiSet: 'ExcelApi 1.1' },
  { member: 'RangeFill.color', apiSet: 'ExcelApi 1.1' },
  { member: 'RangeFont.bold', apiSet: 'ExcelApi 1.1' },
  { member: 'RangeFont.color', apiSet: 'ExcelApi 1.1' },
  { member: 'RangeFormat.columnWidth', apiSet: 'ExcelApi 1.2' },
  { member: 'RangeFormat.fill', apiSet: 'ExcelApi 1.1' },
  { member: 'RangeFormat.font', apiSet: 'ExcelApi 1.1' },
  { member: 'RequestContext.workbook', apiSet: null },
  // The typings state no set for delayForCellEdit (Microsoft's docs: ExcelApi 1.11); the client drops it where unsupported.
  { member: 'RunOptions.delayForCellEdit', apiSet: null },
  { member: 'RunOptions.mergeUndoGroup', apiSet: 'ExcelApi 1.20', featureDetected: true },
  { member: 'Setting.delete', apiSet: 'ExcelApi 1.4' },
  { member: 'Setting.load', apiSet: null },
  { member: 'Setting.value', apiSet: 'ExcelApi 1.4' },
  { member: 'SettingCollection.add', apiSet: 'ExcelApi 1.4' },
  { member: 'SettingCollection.getItem', apiSet: 'ExcelApi 1.4' },
  { member: 'SettingCollection.getItemOrNullObject', apiSet: 'ExcelApi 1.4' },
  { member: 'Table.columns', apiSet: 'ExcelApi 1.1' },
  { member: 'Table.getHeaderRowRange', apiSet: 'ExcelApi 1.1' },
  { member: 'Table.getRange', apiSet: 'ExcelApi 1.1' },
  { member: 'Table.load', apiSet: null },
  { member: 'Table.name', apiSet: 'ExcelApi 1.1' },
  { member: 'TableCollection.getItem', apiSet: 'ExcelApi 1.1' },
  { member: 'TableCollection.getItemOrNullObject', apiSet: 'ExcelApi 1.4' },
  { member: 'TableColumn.delete', apiSet: 'ExcelApi 1.1' },
  { member: 'TableColumn.load', apiSet: null },
  { member: 'TableColumn.name', apiSet: 'ExcelApi 1.1' },
  { member: 'TableColumnCollection.add', apiSet: 'ExcelApi 1.1' },
  { member: 'TableColumnCollection.getItem', apiSet: 'ExcelApi 1.1' },
  { member: 'TableColumnCollection.getItemOrNullObject', apiSet: 'ExcelApi 1.4' },
  { member: 'TableColumnCollection.items', apiSet: null },
  { member: 'TableColumnCollection.load', apiSet: null },
  { member: 'TableScopedCollection.items', apiSet: null },
  { member: 'TableScopedCollection.load', apiSet: null },
  { member: 'Workbook.getSelectedRange', apiSet: 'ExcelApi 1.1' },
  { member: 'Workbook.onSelectionChanged', apiSet: 'ExcelApi 1.2' },
  { member: 'Workbook.settings', apiSet: 'ExcelApi 1.4' },
  { member: 'Workbook.tables', apiSet: 'ExcelApi 1.1' },
  { member: 'Workbook.worksheets', apiSet: 'ExcelApi 1.1' },
  { member: 'Worksheet.activate', apiSet: 'ExcelApi 1.1' },
  { member: 'Worksheet.delete', apiSet: 'ExcelApi 1.1' },
  { member: 'Worksheet.getRange', apiSet: 'ExcelApi 1.1' },
  { member: 'Worksheet.getRangeByIndexes', apiSet: 'ExcelApi 1.7' },
  { member: 'Worksheet.getUsedRangeOrNullObject', apiSet: 'ExcelApi 1.4' },
  { member: 'Range.getUsedRangeOrNullObject', apiSet: 'ExcelApi 1.4' },
  { member: 'Worksheet.load', apiSet: null },
  { member: 'Worksheet.name', apiSet: 'ExcelApi 1.1' },
  { member: 'Worksheet.protection', apiSet: 'ExcelApi 1.2' },
  { member: 'WorksheetCollection.add', apiSet: 'ExcelApi 1.1' },
  { member: 'WorksheetCollection.getItem', apiSet: 'ExcelApi 1.1' },
  { member: 'WorksheetCollection.getItemOrNullObject', apiSet: 'ExcelApi 1.4' },
  { member: 'WorksheetProtection.load', apiSet: null },
  { member: 'WorksheetProtection.protected', apiSet: 'ExcelApi 1.2' },
];

/** Highest ExcelApi version among the members (the manifest must declare at least this). */
function maxVersion(): string {
  let best = [1, 1];
  for (const m of EXCEL_MEMBERS) {
    if (m.featureDetected) continue;
    const v = /^ExcelApi ([0-9]+)\.([0-9]+)$/.exec(m.apiSet ?? '');
    if (!v) continue;
    const x = [Number(v[1]), Number(v[2])];
    if (x[0] > best[0] || (x[0] === best[0] && x[1] > best[1])) best = x;
  }
  return `${best[0]}.${best[1]}`;
}

/** The ExcelApi requirement-set version the add-in needs, e.g. "1.9" (MinVersion in the manifest). */
export const REQUIRED_EXCEL_API: string = maxVersion();
/** The same as a requirement-set name and version. */
export const REQUIRED_EXCEL_API_SET = { name: 'ExcelApi', minVersion: REQUIRED_EXCEL_API } as const;
