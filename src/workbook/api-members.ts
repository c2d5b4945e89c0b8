export const REQUIRED_EXCEL_API = 'ExcelApi 1.9';
