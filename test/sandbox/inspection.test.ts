// Public read accessors of SandboxWorkbook (usedRange, columnWidth) and the preview grid's source,
// which reads sheets through them only.
import { describe, expect, it } from 'vitest';
import { sandboxFromRows, SandboxError } from '../../src/sandbox/index.js';
import { sandboxSource } from '../../src/preview/sandboxSource.js';

describe('usedRange / columnWidth', () => {
  it('usedRange counts from A1 to the last used cell; formats count unless valuesOnly', async () => {
    const sb = sandboxFromRows('S', [['Id', 'Amount'], ['C1', 10], ['C2', 20]]);
    sb.addSheet('Empty');
    expect(sb.usedRange('S')).toEqual({ rows: 3, cols: 2 });
    expect(sb.usedRange('Empty')).toEqual({ rows: 0, cols: 0 });
    // A value far from A1 still counts from A1 (the grid shows the rows and columns before it).
    sb.setCell('S', 9, 5, 'late');
    expect(sb.usedRange('S')).toEqual({ rows: 10, cols: 6 });
    // A format-only cell (bold, written through the API) counts, except with valuesOnly.
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('H20').format.font.bold = true;
      await context.sync();
    });
    expect(sb.usedRange('S')).toEqual({ rows: 20, cols: 8 });
    expect(sb.usedRange('S', true)).toEqual({ rows: 10, cols: 6 });
    expect(() => sb.usedRange('Nope')).toThrow(SandboxError);
  });

  it('columnWidth is null until a width is set, then the width in points', async () => {
    const sb = sandboxFromRows('S', [['Id', 'Amount']]);
    expect(sb.columnWidth('S', 1)).toBeNull();
    sb.setColumnWidth('S', 'B', 72);
    expect(sb.columnWidth('S', 1)).toBe(72);
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('D:D').format.columnWidth = 30;
      await context.sync();
    });
    expect(sb.columnWidth('S', 3)).toBe(30);
    expect(sb.columnWidth('S', 2)).toBeNull();
  });
});

describe('preview grid source', () => {
  it('sizes the grid and its column widths from the public accessors (px = points x 4/3, default 64 px)', () => {
    const sb = sandboxFromRows('S', [['Id', 'Amount', 'Note'], ['C1', 10, '']]);
    sb.setColumnWidth('S', 'B', 60);
    const src = sandboxSource(sb);
    expect(src.size('S')).toEqual({ rows: 2, cols: 3 });
    expect(src.columnWidths('S', 3)).toEqual([64, 80, 64]);
    expect(src.size('Missing')).toEqual({ rows: 0, cols: 0 });
    expect(src.columnWidths('Missing', 2)).toEqual([64, 64]);
  });
});
