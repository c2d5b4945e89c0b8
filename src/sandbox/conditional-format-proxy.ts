/** Conditional formats (Custom rules): the collection, a rule, its formula, fill and font. */
import { intersect } from './address.js';
import { normaliseColour, type ConditionalFormatModel, type SheetModel } from './model.js';
import type { SandboxContext } from './context.js';
import { err, late, assertWritable, ProxyBase, CollectionBase, type RangeTarget } from './proxy-base.js';
import { RangeProxy, RangeAreasProxy } from './range-proxy.js';

interface CfTarget {
  readonly sheet: SheetModel;
  readonly id: string;
}

function findCf(t: CfTarget): ConditionalFormatModel {
  const cf = t.sheet.cfs.find((c) => c.id === t.id);
  if (!cf) throw err('ItemNotFound', 'The conditional format no longer exists.', 'ConditionalFormat');
  return cf;
}

function mutateCf(ctx: SandboxContext, t: CfTarget, f: (cf: ConditionalFormatModel) => void): void {
  assertWritable(t.sheet, 'ConditionalFormat');
  ctx.model.touch(t.sheet);
  f(findCf(t));
}

export class ConditionalFormatCollectionProxy extends CollectionBase<RangeTarget, ConditionalFormatProxy> {
  protected readonly entity = 'ConditionalFormatCollection';
  protected readonly scalars = [] as const;
  readonly itemScalars = ['id', 'type', 'priority', 'stopIfTrue'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  protected read(): unknown {
    return undefined;
  }
  /** Rules whose ranges intersect this range, in priority order. */
  protected list(t: RangeTarget): ConditionalFormatProxy[] {
    return t.sheet.cfs
      .filter((cf) => cf.rects.some((r) => intersect(r, t.rect)))
      .map((cf) => {
        const p = new ConditionalFormatProxy(this.context, `${this.path}.getItem(${JSON.stringify(cf.id)})`, false, () => ({ sheet: t.sheet, id: cf.id }));
        p.bind({ sheet: t.sheet, id: cf.id });
        return p;
      });
  }
  /** Only "Custom" is modelled; other types fail with NotImplemented. The new rule gets priority 0 (evaluated first), as in Excel. */
  add(type: string): ConditionalFormatProxy {
    let created: CfTarget | null = null;
    const p = new ConditionalFormatProxy(this.context, `${this.path}.add(${JSON.stringify(type)})`, false, () => created);
    this.context.enqueue({
      write: true,
      statement: `${this.path}.add(${JSON.stringify(type)})`,
      payload: type,
      run: () => {
        const t = this.range.target();
        assertWritable(t.sheet, 'ConditionalFormatCollection.add');
        if (type !== 'Custom') throw err('NotImplemented', `Conditional format type "${type}" is not modelled by the sandbox (only "Custom").`, 'ConditionalFormatCollection.add');
        const m = this.context.model;
        m.touch(t.sheet);
        const cf: ConditionalFormatModel = {
          id: m.newId('cf'), type: 'Custom', rects: [{ ...t.rect }], anchor: { row: t.rect.r0, col: t.rect.c0 },
          formula: '', fill: null, font: null, bold: null, stopIfTrue: false,
        };
        t.sheet.cfs.unshift(cf);
        created = { sheet: t.sheet, id: cf.id };
        p.bind(created);
      },
    });
    return p;
  }
  getItem(id: string): ConditionalFormatProxy {
    return new ConditionalFormatProxy(this.context, `${this.path}.getItem(${JSON.stringify(id)})`, false, () => {
      const t = this.range.target();
      return t.sheet.cfs.some((c) => c.id === id) ? { sheet: t.sheet, id } : null;
    });
  }
  getItemAt(index: number): ConditionalFormatProxy {
    return new ConditionalFormatProxy(this.context, `${this.path}.getItemAt(${index})`, false, () => {
      const items = this.list(this.range.target());
      return items[index]?.memo ?? null;
    });
  }
  /** Deletes every rule intersecting the range (Excel's clearAll). Tailmark must not call it on user ranges. */
  clearAll(): void {
    this.call('clearAll', null, (t) => {
      assertWritable(t.sheet, 'ConditionalFormatCollection.clearAll');
      this.context.model.touch(t.sheet);
      t.sheet.cfs = t.sheet.cfs.filter((cf) => !cf.rects.some((r) => intersect(r, t.rect)));
    });
  }
}

export class ConditionalFormatProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalFormat';
  protected readonly scalars = ['id', 'type', 'priority', 'stopIfTrue'] as const;
  readonly custom: CustomConditionalFormatProxy;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => CfTarget | null) {
    super(ctx, path, orNull);
    this.custom = new CustomConditionalFormatProxy(ctx, `${path}.custom`, this);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  protected override stillValid(t: CfTarget): boolean {
    return t.sheet.cfs.some((c) => c.id === t.id);
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'custom' ? this.custom : undefined;
  }
  protected read(t: CfTarget, prop: string): unknown {
    const cf = findCf(t);
    switch (prop) {
      case 'id': return cf.id;
      case 'type': return cf.type;
      case 'priority': return t.sheet.cfs.indexOf(cf);
      case 'stopIfTrue': return cf.stopIfTrue;
    }
    return undefined;
  }
  get id(): string { return this.get('id'); }
  get type(): string { return this.get('type'); }
  get priority(): number { return this.get('priority'); }
  /** Moves the rule to that position in the sheet's priority order (0 = evaluated first). */
  set priority(v: number) {
    this.setProp('priority', v, (t) => mutateCf(this.context, t, (cf) => {
      if (!Number.isInteger(v) || v < 0) throw err('InvalidArgument', `priority must be a non-negative integer (got ${v}).`, 'ConditionalFormat.priority');
      const rest = t.sheet.cfs.filter((c) => c !== cf);
      rest.splice(Math.min(v, rest.length), 0, cf);
      t.sheet.cfs = rest;
    }));
  }
  get stopIfTrue(): boolean { return this.get('stopIfTrue'); }
  set stopIfTrue(v: boolean) {
    this.setProp('stopIfTrue', v, (t) => mutateCf(this.context, t, (cf) => { cf.stopIfTrue = !!v; }));
  }
  /** The rule's range; InvalidOperation when it has several areas (use getRanges). */
  getRange(): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getRange()`, false, () => {
      const t = this.target();
      const cf = findCf(t);
      if (cf.rects.length !== 1) throw err('InvalidOperation', 'The conditional format applies to several areas; use getRanges().', 'ConditionalFormat.getRange');
      return { sheet: t.sheet, rect: cf.rects[0] };
    });
  }
  getRangeOrNullObject(): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getRangeOrNullObject()`, true, () => {
      const t = this.targetOrNull();
      if (!t) return null;
      const cf = t.sheet.cfs.find((c) => c.id === t.id);
      return cf && cf.rects.length === 1 ? { sheet: t.sheet, rect: cf.rects[0] } : null;
    });
  }
  getRanges(): RangeAreasProxy {
    return new RangeAreasProxy(this.context, `${this.path}.getRanges()`, false, () => {
      const t = this.target();
      return { sheet: t.sheet, rects: findCf(t).rects.map((r) => ({ ...r })) };
    });
  }
  delete(): void {
    this.call('delete', null, (t) => {
      assertWritable(t.sheet, 'ConditionalFormat.delete');
      findCf(t);
      this.context.model.touch(t.sheet);
      t.sheet.cfs = t.sheet.cfs.filter((c) => c.id !== t.id);
    });
  }
}

export class CustomConditionalFormatProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'CustomConditionalFormat';
  protected readonly scalars = [] as const;
  readonly rule: ConditionalFormatRuleProxy;
  readonly format: ConditionalRangeFormatProxy;
  constructor(ctx: SandboxContext, path: string, readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
    this.rule = new ConditionalFormatRuleProxy(ctx, `${path}.rule`, owner);
    this.format = new ConditionalRangeFormatProxy(ctx, `${path}.format`, owner);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(): unknown {
    return undefined;
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'rule' ? this.rule : name === 'format' ? this.format : undefined;
  }
}

export class ConditionalFormatRuleProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalFormatRule';
  protected readonly scalars = ['formula', 'formulaLocal'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(t: CfTarget, prop: string): unknown {
    return prop === 'formula' || prop === 'formulaLocal' ? findCf(t).formula : undefined;
  }
  get formula(): string { return this.get('formula'); }
  /** The rule formula, relative references written against the top-left cell of the rule's range. */
  set formula(v: string) {
    this.setProp('formula', v, (t) => mutateCf(this.context, t, (cf) => {
      if (typeof v !== 'string' || v.length === 0) throw err('InvalidArgument', 'A conditional format rule formula must be a non-empty string.', 'ConditionalFormatRule.formula');
      cf.formula = v.startsWith('=') ? v : `=${v}`;
    }));
  }
  get formulaLocal(): string { return this.get('formulaLocal'); }
  set formulaLocal(v: string) { this.formula = v; }
}

export class ConditionalRangeFormatProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalRangeFormat';
  protected readonly scalars = [] as const;
  readonly fill: CfFillProxy;
  readonly font: CfFontProxy;
  constructor(ctx: SandboxContext, path: string, private readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
    this.fill = new CfFillProxy(ctx, `${path}.fill`, owner);
    this.font = new CfFontProxy(ctx, `${path}.font`, owner);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(): unknown {
    return undefined;
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'fill' ? this.fill : name === 'font' ? this.font : undefined;
  }
}

export class CfFillProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalRangeFill';
  protected readonly scalars = ['color'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(t: CfTarget, prop: string): unknown {
    return prop === 'color' ? findCf(t).fill : undefined;
  }
  get color(): string { return this.get('color'); }
  set color(v: string) {
    this.setProp('color', v, (t) => mutateCf(this.context, t, (cf) => { cf.fill = normaliseColour(v, 'ConditionalRangeFill.color'); }));
  }
  clear(): void {
    this.call('clear', null, (t) => mutateCf(this.context, t, (cf) => { cf.fill = null; }));
  }
}

export class CfFontProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalRangeFont';
  protected readonly scalars = ['color', 'bold'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(t: CfTarget, prop: string): unknown {
    const cf = findCf(t);
    return prop === 'color' ? cf.font : prop === 'bold' ? cf.bold : undefined;
  }
  get color(): string { return this.get('color'); }
  set color(v: string) {
    this.setProp('color', v, (t) => mutateCf(this.context, t, (cf) => { cf.font = normaliseColour(v, 'ConditionalRangeFont.color'); }));
  }
  get bold(): boolean { return this.get('bold'); }
  set bold(v: boolean) {
    this.setProp('bold', v, (t) => mutateCf(this.context, t, (cf) => { cf.bold = !!v; }));
  }
  clear(): void {
    this.call('clear', null, (t) => mutateCf(this.context, t, (cf) => { cf.font = null; cf.bold = null; }));
  }
}

late.ConditionalFormatCollectionProxy = ConditionalFormatCollectionProxy;
