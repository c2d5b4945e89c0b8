/** Data validation (list rules). */
import { type Rect, intersect, contains } from './address.js';
import type { SandboxContext } from './context.js';
import { err, assertWritable, ProxyBase, type RangeTarget } from './proxy-base.js';
import type { RangeProxy } from './range-proxy.js';

export class DataValidationProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'DataValidation';
  protected readonly scalars = ['type', 'rule', 'ignoreBlanks'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  /** "None" when no cell has a rule; "List" when one list rule covers every cell; "Inconsistent" otherwise (rule then reads {}). */
  protected read(t: RangeTarget, prop: string): unknown {
    const m = this.context.model;
    const vs = m.validationsIn(t.sheet, t.rect);
    const single = vs.length === 1 && coversRect(vs[0].rects, t.rect) ? vs[0] : null;
    switch (prop) {
      case 'type': return vs.length === 0 ? 'None' : single ? 'List' : 'Inconsistent';
      case 'rule': return single ? { list: { ...single.rule.list } } : {};
      case 'ignoreBlanks': return single ? single.ignoreBlanks : true;
    }
    return undefined;
  }
  get type(): string { return this.get('type'); }
  get rule(): { list?: { source: string; inCellDropDown: boolean } } { return this.get('rule'); }
  /**
   * Only list rules are modelled: { list: { source: "A,B,C" | "=$A$1:$A$3", inCellDropDown?: boolean } }.
   * Setting a rule replaces any validation on those cells (the sandbox does not require clear() first).
   */
  set rule(v: { list?: { source: unknown; inCellDropDown?: boolean } }) {
    this.setProp('rule', v, (t) => {
      assertWritable(t.sheet, 'DataValidation.rule');
      const keys = v && typeof v === 'object' ? Object.keys(v).filter((k) => (v as Record<string, unknown>)[k] !== undefined) : [];
      if (keys.length !== 1 || keys[0] !== 'list') throw err('NotImplemented', `The sandbox models only list validation rules (got ${JSON.stringify(keys)}).`, 'DataValidation.rule');
      const src = v.list!.source;
      if (typeof src !== 'string' || src.length === 0) throw err('InvalidArgument', 'A list validation needs a non-empty source string.', 'DataValidation.rule');
      // Excel refuses a typed-in list longer than 255 characters (a range reference has no such limit).
      if (!src.startsWith('=') && src.length > 255) throw err('InvalidArgument', `The list source is ${src.length} characters long; a typed-in list holds at most 255. Put the items in cells and refer to them instead.`, 'DataValidation.rule');
      this.context.model.setValidation(t.sheet, t.rect, { list: { source: src, inCellDropDown: v.list!.inCellDropDown ?? true } }, true);
    });
  }
  get ignoreBlanks(): boolean { return this.get('ignoreBlanks'); }
  set ignoreBlanks(v: boolean) {
    this.setProp('ignoreBlanks', v, (t) => {
      assertWritable(t.sheet, 'DataValidation.ignoreBlanks');
      const m = this.context.model;
      m.touch(t.sheet);
      for (const x of m.validationsIn(t.sheet, t.rect)) x.ignoreBlanks = !!v;
    });
  }
  clear(): void {
    this.call('clear', null, (t) => {
      assertWritable(t.sheet, 'DataValidation.clear');
      this.context.model.clearValidation(t.sheet, t.rect);
    });
  }
}

function coversRect(rects: Rect[], r: Rect): boolean {
  if (rects.some((x) => contains(x, r))) return true;
  let area = 0;
  for (const x of rects) {
    const i = intersect(x, r);
    if (i) area += i.rows * i.cols;
  }
  return area === r.rows * r.cols; // validation rects are kept disjoint
}
