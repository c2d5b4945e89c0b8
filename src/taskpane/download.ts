/**
 * Saving a file from the page (the browser's download): used by the pane (the marks as CSV) and
 * the preview page (the workbook as .xlsx). Nothing leaves the machine. In Excel on the web this
 * is the browser's download; desktop Excel's pane may not offer downloads, which is why the pane
 * also copies marks to a sheet.
 */
export function downloadBlob(blob: Blob, name: string): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  a.click();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
