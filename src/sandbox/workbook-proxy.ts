/** The workbook proxy: its collections, the selection, and selection-changed events. */
import { rect } from './address.js';
import type { WorkbookModel } from './model.js';
import type { SandboxContext } from './context.js';
import { err, ProxyBase } from './proxy-base.js';
import { WorksheetCollectionProxy } from './worksheet-proxy.js';
import { RangeProxy, RangeAreasProxy } from './range-proxy.js';
import { TableCollectionProxy } from './table-proxy.js';
import { SettingCollectionProxy } from './settings-proxy.js';

export class WorkbookProxy extends ProxyBase<WorkbookModel> {
  protected readonly entity = 'Workbook';
  protected readonly scalars = ['name', 'readOnly'] as const;
  readonly worksheets: WorksheetCollectionProxy;
  readonly tables: TableCollectionProxy;
  readonly settings: SettingCollectionProxy;
  readonly onSelectionChanged: SelectionEventProxy;
  readonly protection: WorkbookProtectionProxy;

  constructor(ctx: SandboxContext) {
    super(ctx, 'workbook', false);
    this.worksheets = new WorksheetCollectionProxy(ctx);
    this.tables = new TableCollectionProxy(ctx, 'workbook.tables', null);
    this.settings = new SettingCollectionProxy(ctx);
    this.onSelectionChanged = new SelectionEventProxy(ctx);
    this.protection = new WorkbookProtectionProxy(ctx, 'workbook.protection');
  }
  protected resolveRaw(): WorkbookModel {
    return this.context.model;
  }
  protected read(_t: WorkbookModel, prop: string): unknown {
    if (prop === 'name') return this.context.sandbox.name;
    if (prop === 'readOnly') return this.context.sandbox.mode.readOnly;
    return undefined;
  }
  get name(): string {
    return this.get('name');
  }
  /** True when the workbook is open read-only (ExcelApi 1.8). */
  get readOnly(): boolean {
    return this.get('readOnly');
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'protection' ? this.protection : undefined;
  }

  /** The single selected range; fails with InvalidSelection when several areas are selected (as Excel documents). */
  getSelectedRange(): RangeProxy {
    return new RangeProxy(this.context, 'workbook.getSelectedRange()', false, () => {
      const m = this.context.model;
      const sel = m.selection;
      const sheet = m.sheetById(sel.sheetId) ?? m.activeSheet();
      if (sel.areas.length !== 1) throw err('InvalidSelection', 'The current selection has multiple areas; getSelectedRange() needs a single range. Use getSelectedRanges().', 'Workbook.getSelectedRange');
      return { sheet, rect: sel.areas[0] };
    });
  }

  getSelectedRanges(): RangeAreasProxy {
    return new RangeAreasProxy(this.context, 'workbook.getSelectedRanges()', false, () => {
      const m = this.context.model;
      const sheet = m.sheetById(m.selection.sheetId) ?? m.activeSheet();
      return { sheet, rects: m.selection.areas.map((a) => ({ ...a })) };
    });
  }

  getActiveCell(): RangeProxy {
    return new RangeProxy(this.context, 'workbook.getActiveCell()', false, () => {
      const m = this.context.model;
      const sheet = m.sheetById(m.selection.sheetId) ?? m.activeSheet();
      const a = m.selection.areas[0];
      return { sheet, rect: rect(a.r0, a.c0, 1, 1) };
    });
  }
}

export class SelectionEventProxy {
  constructor(private readonly ctx: SandboxContext) {}
  add(handler: (args: { workbook: unknown; type: string }) => unknown): EventHandlerResultProxy {
    const result = new EventHandlerResultProxy(this.ctx);
    this.ctx.enqueue({
      statement: 'workbook.onSelectionChanged.add(handler)',
      payload: null,
      run: () => ({ commit: () => { result.id = this.ctx.sandbox.addSelectionListener(handler); } }),
    });
    return result;
  }
}

export class EventHandlerResultProxy {
  /** @internal */ id = -1;
  constructor(readonly context: SandboxContext) {}
  remove(): void {
    this.context.enqueue({
      statement: 'EventHandlerResult.remove()',
      payload: null,
      run: () => ({ commit: () => { this.context.sandbox.removeSelectionListener(this.id); } }),
    });
  }
}

/** Workbook-structure protection (ExcelApi 1.7): `protected` reads the sandbox's switch. */
export class WorkbookProtectionProxy extends ProxyBase<WorkbookModel> {
  protected readonly entity = 'WorkbookProtection';
  protected readonly scalars = ['protected'] as const;
  constructor(ctx: SandboxContext, path: string) {
    super(ctx, path, false);
  }
  protected resolveRaw(): WorkbookModel {
    return this.context.model;
  }
  protected read(_t: WorkbookModel, prop: string): unknown {
    return prop === 'protected' ? this.context.sandbox.mode.structureProtected : undefined;
  }
  get protected(): boolean {
    return this.get('protected');
  }
}
