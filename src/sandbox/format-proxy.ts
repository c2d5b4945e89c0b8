/** Range formats: column width, wrap, fill and font. */
import { CellError, DEFAULT_COLUMN_WIDTH, normaliseColour, type Attr } from './model.js';
import type { SandboxContext } from './context.js';
import { err, assertWritable, ProxyBase, type RangeTarget } from './proxy-base.js';
import { formatText } from './cells.js';
import type { RangeProxy } from './range-proxy.js';

/**
 * The common value of a cell attribute over a range, or null when cells differ. Rows beyond the
 * longest stored array all hold the default, so whole-column ranges cost O(stored rows).
 */
function uniform<V>(t: RangeTarget, attr: Attr, dflt: V): V | null {
  let first: V | undefined;
  let set = false;
  for (let j = 0; j < t.rect.cols; j++) {
    const arr = t.sheet.cols[t.rect.c0 + j]?.[attr] as unknown[] | undefined;
    const stored = arr ? Math.min(arr.length, t.rect.r0 + t.rect.rows) : t.rect.r0;
    for (let r = t.rect.r0; r < stored; r++) {
      const v = ((arr as unknown[])[r] ?? dflt) as V;
      if (!set) { first = v; set = true; } else if (v !== first) return null;
    }
    if (stored < t.rect.r0 + t.rect.rows) {
      if (!set) { first = dflt; set = true; } else if (dflt !== first) return null;
    }
  }
  return first === undefined ? null : first;
}

export class RangeFormatProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'RangeFormat';
  protected readonly scalars = ['columnWidth', 'rowHeight', 'wrapText'] as const;
  readonly fill: RangeFillProxy;
  readonly font: RangeFontProxy;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
    this.fill = new RangeFillProxy(ctx, `${path}.fill`, range);
    this.font = new RangeFontProxy(ctx, `${path}.font`, range);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'fill' ? this.fill : name === 'font' ? this.font : undefined;
  }
  protected read(t: RangeTarget, prop: string): unknown {
    switch (prop) {
      case 'columnWidth': {
        let w: number | null = null;
        for (let j = 0; j < t.rect.cols; j++) {
          const x = t.sheet.widths.get(t.rect.c0 + j) ?? DEFAULT_COLUMN_WIDTH;
          if (j === 0) w = x; else if (x !== w) return null;
        }
        return w;
      }
      case 'rowHeight': return 15;
      case 'wrapText': return uniform(t, 'wrap', false);
    }
    return undefined;
  }
  get columnWidth(): number { return this.get('columnWidth'); }
  /** Width in points (Excel's unit for this property). */
  set columnWidth(v: number) {
    this.setProp('columnWidth', v, (t) => {
      assertWritable(t.sheet, 'RangeFormat.columnWidth');
      if (typeof v !== 'number' || !(v >= 0) || v > 255 * 7.5) throw err('InvalidArgument', `columnWidth ${v} is not a valid width in points.`, 'RangeFormat.columnWidth');
      this.context.model.touch(t.sheet);
      for (let j = 0; j < t.rect.cols; j++) t.sheet.widths.set(t.rect.c0 + j, v);
    });
  }
  get rowHeight(): number { return this.get('rowHeight'); }
  get wrapText(): boolean { return this.get('wrapText'); }
  set wrapText(v: boolean) {
    this.setProp('wrapText', v, (t) => {
      assertWritable(t.sheet, 'RangeFormat.wrapText');
      eachCell(t, (r, c) => this.context.model.setAttr(t.sheet, r, c, 'wrap', v ? true : undefined));
    });
  }
  /**
   * Sets column widths from the longest displayed text in each column of the range (sandbox
   * approximation: 7 points per character + 5, at least 12; Excel measures the rendered font).
   */
  autofitColumns(): void {
    this.call('autofitColumns', null, (t) => {
      assertWritable(t.sheet, 'RangeFormat.autofitColumns');
      const m = this.context.model;
      const used = m.usedRect(t.sheet, true);
      m.touch(t.sheet);
      for (let j = 0; j < t.rect.cols; j++) {
        const c = t.rect.c0 + j;
        let longest = 0;
        if (used) {
          const r0 = Math.max(t.rect.r0, used.r0);
          const r1 = Math.min(t.rect.r0 + t.rect.rows, used.r0 + used.rows);
          for (let r = r0; r < r1; r++) {
            const v = m.readValue(t.sheet, r, c);
            if (v === null) continue;
            const s = formatText(v instanceof CellError ? v.code : v, m.getAttr(t.sheet, r, c, 'nf'));
            if (s.length > longest) longest = s.length;
          }
        }
        if (longest > 0) t.sheet.widths.set(c, Math.max(12, longest * 7 + 5));
      }
    });
  }
  autofitRows(): void {
    this.call('autofitRows', null, () => undefined);
  }
}

function eachCell(t: RangeTarget, f: (row: number, col: number) => void): void {
  for (let j = 0; j < t.rect.cols; j++) for (let i = 0; i < t.rect.rows; i++) f(t.rect.r0 + i, t.rect.c0 + j);
}

export class RangeFillProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'RangeFill';
  protected readonly scalars = ['color'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  /** Uniform fill as "#RRGGBB"; "#FFFFFF" for no fill (as Excel reports); null when mixed. */
  protected read(t: RangeTarget, prop: string): unknown {
    if (prop !== 'color') return undefined;
    return uniform(t, 'fill', '#FFFFFF');
  }
  get color(): string { return this.get('color'); }
  set color(v: string) {
    this.setProp('color', v, (t) => {
      assertWritable(t.sheet, 'RangeFill.color');
      const c = normaliseColour(v, 'RangeFill.color');
      eachCell(t, (r, col) => this.context.model.setAttr(t.sheet, r, col, 'fill', c));
    });
  }
  clear(): void {
    this.call('clear', null, (t) => {
      assertWritable(t.sheet, 'RangeFill.clear');
      eachCell(t, (r, c) => this.context.model.setAttr(t.sheet, r, c, 'fill', undefined));
    });
  }
}

export class RangeFontProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'RangeFont';
  protected readonly scalars = ['color', 'bold'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  protected read(t: RangeTarget, prop: string): unknown {
    if (prop === 'color') return uniform(t, 'font', '#000000');
    if (prop === 'bold') return uniform(t, 'bold', false);
    return undefined;
  }
  get color(): string { return this.get('color'); }
  set color(v: string) {
    this.setProp('color', v, (t) => {
      assertWritable(t.sheet, 'RangeFont.color');
      const c = normaliseColour(v, 'RangeFont.color');
      eachCell(t, (r, col) => this.context.model.setAttr(t.sheet, r, col, 'font', c));
    });
  }
  get bold(): boolean { return this.get('bold'); }
  set bold(v: boolean) {
    this.setProp('bold', v, (t) => {
      assertWritable(t.sheet, 'RangeFont.bold');
      eachCell(t, (r, c) => this.context.model.setAttr(t.sheet, r, c, 'bold', v ? true : undefined));
    });
  }
}
