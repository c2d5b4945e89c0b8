/**
 * Write the invented demo claims (src/demo) to an .xlsx input workbook, formatted the way a claims
 * export typically looks: bold header, dates and amounts formatted, frozen header row.
 */
import ExcelJS from 'exceljs';
import { DEMO_COMPANY, DEMO_SHEET, type DemoTable } from '../demo/claims.js';

export async function writeDemoWorkbook(path: string, table: DemoTable): Promise<void> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Tailmark demo';
  wb.title = `${DEMO_COMPANY}: expense claims, Q1 2025 (invented data)`;
  const ws = wb.addWorksheet(DEMO_SHEET, { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.addRow(table.headers);
  for (const raw of table.rows) {
    ws.addRow(
      raw.map((v): ExcelJS.CellValue => {
        if (v === null || v === undefined) return null;
        if (typeof v === 'object' && !(v instanceof Date)) return { error: v.code as ExcelJS.CellErrorValue['error'] };
        return v;
      }),
    );
  }
  const header = ws.getRow(1);
  header.font = { bold: true };
  header.border = { bottom: { style: 'thin' } };
  const col = (name: string) => ws.getColumn(table.headers.indexOf(name) + 1);
  col('Claim date').numFmt = 'dd mmm yyyy';
  col('Amount').numFmt = '#,##0.00;(#,##0.00)';
  const widths: Record<string, number> = { 'Claim ID': 12, Employee: 20, 'Cost centre': 12, Category: 16, 'Claim date': 13, Amount: 12, Notes: 28 };
  table.headers.forEach((h, i) => (ws.getColumn(i + 1).width = widths[h] ?? 14));
  // Header row formats stay as set above (column formats would otherwise apply to row 1 too).
  header.eachCell((c) => (c.numFmt = 'General'));
  await wb.xlsx.writeFile(path);
}
