/** Worksheets: the collection, a sheet (its ranges and tables), and sheet protection. */
import { MAX_COLS, MAX_ROWS, rect, parseAddress, inGrid } from './address.js';
import type { WorkbookModel, SheetModel } from './model.js';
import type { SandboxContext } from './context.js';
import { err, late, CollectionBase, ProxyBase } from './proxy-base.js';

/** Workbook-structure protection refuses adding, deleting, renaming, moving and hiding sheets. */
function structureEditable(ctx: SandboxContext, where: string): void {
  if (ctx.sandbox.mode.structureProtected) {
    throw err('AccessDenied', 'The workbook structure is protected: sheets cannot be added, deleted, renamed, moved or hidden. Unprotect the workbook (Review > Protect Workbook) and try again.', where);
  }
}
import { RangeProxy } from './range-proxy.js';
import { TableCollectionProxy } from './table-proxy.js';

// ---------------------------------------------------------------- worksheets

export class WorksheetCollectionProxy extends CollectionBase<WorkbookModel, WorksheetProxy> {
  protected readonly entity = 'WorksheetCollection';
  protected readonly scalars = [] as const;
  readonly itemScalars = WORKSHEET_SCALARS;
  constructor(ctx: SandboxContext) {
    super(ctx, 'workbook.worksheets', false);
  }
  protected resolveRaw(): WorkbookModel {
    return this.context.model;
  }
  protected read(): unknown {
    return undefined;
  }
  protected list(t: WorkbookModel): WorksheetProxy[] {
    return t.sheets.map((s) => {
      const p = new WorksheetProxy(this.context, `worksheets.getItem(${JSON.stringify(s.name)})`, false, () => s);
      p.bind(s);
      return p;
    });
  }
  getActiveWorksheet(): WorksheetProxy {
    return new WorksheetProxy(this.context, 'worksheets.getActiveWorksheet()', false, () => this.context.model.activeSheet());
  }
  getItem(key: string): WorksheetProxy {
    return new WorksheetProxy(this.context, `worksheets.getItem(${JSON.stringify(key)})`, false, () => this.find(key));
  }
  getItemOrNullObject(key: string): WorksheetProxy {
    return new WorksheetProxy(this.context, `worksheets.getItemOrNullObject(${JSON.stringify(key)})`, true, () => this.find(key));
  }
  private find(key: string): SheetModel | null {
    const m = this.context.model;
    return m.sheetByName(key) ?? m.sheetById(key) ?? null;
  }
  getFirst(): WorksheetProxy {
    return new WorksheetProxy(this.context, 'worksheets.getFirst()', false, () => this.context.model.sheets[0] ?? null);
  }
  /** Adds a sheet (named "SheetN" when no name is given); a clashing name fails with ItemAlreadyExists. */
  add(name?: string): WorksheetProxy {
    let created: SheetModel | null = null;
    const p = new WorksheetProxy(this.context, `worksheets.add(${JSON.stringify(name ?? null)})`, false, () => created);
    this.context.enqueue({
      write: true,
      statement: `worksheets.add(${JSON.stringify(name ?? null)})`,
      payload: name ?? null,
      run: () => {
        const m = this.context.model;
        let n = name;
        if (n === undefined || n === null) {
          let i = m.sheets.length + 1;
          while (m.sheetByName(`Sheet${i}`)) i++;
          n = `Sheet${i}`;
        }
        structureEditable(this.context, 'WorksheetCollection.add');
        created = m.addSheet(n);
        p.bind(created);
        this.context.memoResets.push(() => { created = null; p.memo = undefined; });
      },
    });
    return p;
  }
}

const WORKSHEET_SCALARS = ['name', 'id', 'position', 'visibility'] as const;

export class WorksheetProxy extends ProxyBase<SheetModel> {
  protected readonly entity = 'Worksheet';
  protected readonly scalars = WORKSHEET_SCALARS;
  private _protection?: WorksheetProtectionProxy;
  private _tables?: TableCollectionProxy;

  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => SheetModel | null) {
    super(ctx, path, orNull);
  }
  protected resolveRaw(): SheetModel | null {
    return this.resolver();
  }
  protected override stillValid(t: SheetModel): boolean {
    return this.context.model.sheets.includes(t);
  }
  protected read(t: SheetModel, prop: string): unknown {
    switch (prop) {
      case 'name': return t.name;
      case 'id': return t.id;
      case 'position': return this.context.model.sheets.indexOf(t);
      case 'visibility': return t.visibility;
    }
    return undefined;
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    if (name === 'protection') return this.protection;
    if (name === 'tables') return this.tables;
    return undefined;
  }

  get name(): string { return this.get('name'); }
  set name(v: string) {
    this.setProp('name', v, (t) => {
      const m = this.context.model;
      structureEditable(this.context, 'Worksheet.name');
      m.checkSheetName(v, t);
      m.touch(t);
      t.name = v;
    });
  }
  get id(): string { return this.get('id'); }
  get position(): number { return this.get('position'); }
  set position(v: number) {
    this.setProp('position', v, (t) => {
      const m = this.context.model;
      if (!Number.isInteger(v) || v < 0 || v >= m.sheets.length) throw err('InvalidArgument', `Position ${v} is outside 0..${m.sheets.length - 1}.`, 'Worksheet.position');
      structureEditable(this.context, 'Worksheet.position');
      const rest = m.sheets.filter((s) => s !== t);
      rest.splice(v, 0, t);
      m.sheets = rest;
    });
  }
  get visibility(): string { return this.get('visibility'); }
  set visibility(v: 'Visible' | 'Hidden' | 'VeryHidden') {
    this.setProp('visibility', v, (t) => {
      structureEditable(this.context, 'Worksheet.visibility');
      if (!['Visible', 'Hidden', 'VeryHidden'].includes(v)) throw err('InvalidArgument', `Unknown visibility "${String(v)}".`, 'Worksheet.visibility');
      const m = this.context.model;
      if (v !== 'Visible' && m.sheets.filter((s) => s.visibility === 'Visible' && s !== t).length === 0) throw err('InvalidOperation', 'At least one sheet must stay visible.', 'Worksheet.visibility');
      m.touch(t);
      t.visibility = v;
    });
  }

  get protection(): WorksheetProtectionProxy {
    return (this._protection ??= new WorksheetProtectionProxy(this.context, `${this.path}.protection`, this));
  }
  get tables(): TableCollectionProxy {
    return (this._tables ??= new TableCollectionProxy(this.context, `${this.path}.tables`, this));
  }

  /** Range by A1 address; no address = the whole sheet. An address naming another sheet fails with InvalidArgument. */
  getRange(address?: string): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getRange(${JSON.stringify(address ?? '')})`, false, () => {
      const sheet = this.target();
      if (address === undefined || address === null || address === '') return { sheet, rect: rect(0, 0, MAX_ROWS, MAX_COLS) };
      const p = parseAddress(address);
      if (!p) throw err('InvalidArgument', `"${address}" is not a valid range address (the grid ends at XFD1048576).`, 'Worksheet.getRange');
      if (p.sheet !== null && p.sheet.toLowerCase() !== sheet.name.toLowerCase()) throw err('InvalidArgument', `Address "${address}" names another sheet than "${sheet.name}".`, 'Worksheet.getRange');
      return { sheet, rect: p.rect };
    });
  }
  /** 0-based indexes; a range beyond row 1,048,576 or column XFD fails with InvalidArgument. */
  getRangeByIndexes(startRow: number, startColumn: number, rowCount: number, columnCount: number): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getRangeByIndexes(${startRow},${startColumn},${rowCount},${columnCount})`, false, () => {
      const r = rect(startRow, startColumn, rowCount, columnCount);
      if (!inGrid(r)) throw err('InvalidArgument', `getRangeByIndexes(${startRow}, ${startColumn}, ${rowCount}, ${columnCount}) is outside the grid (1,048,576 rows x 16,384 columns) or empty.`, 'Worksheet.getRangeByIndexes');
      return { sheet: this.target(), rect: r };
    });
  }
  getCell(row: number, column: number): RangeProxy {
    return this.getRangeByIndexes(row, column, 1, 1);
  }
  /** Used range; a blank sheet gives A1 (as Excel documents). */
  getUsedRange(valuesOnly?: boolean): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getUsedRange(${valuesOnly ? 'true' : ''})`, false, () => {
      const sheet = this.target();
      return { sheet, rect: this.context.model.usedRect(sheet, !!valuesOnly) ?? rect(0, 0, 1, 1) };
    });
  }
  /** Used range, or a null object on a blank sheet. */
  getUsedRangeOrNullObject(valuesOnly?: boolean): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getUsedRangeOrNullObject(${valuesOnly ? 'true' : ''})`, true, () => {
      const sheet = this.target();
      const u = this.context.model.usedRect(sheet, !!valuesOnly);
      return u ? { sheet, rect: u } : null;
    });
  }
  delete(): void {
    this.call('delete', null, (t) => {
      structureEditable(this.context, 'Worksheet.delete');
      this.context.model.deleteSheet(t);
    });
  }
  activate(): void {
    this.call('activate', null, (t) => {
      const m = this.context.model;
      if (t.visibility !== 'Visible') throw err('InvalidOperation', `Sheet "${t.name}" is hidden and cannot be activated.`, 'Worksheet.activate');
      if (m.activeSheetId !== t.id) {
        m.activeSheetId = t.id;
        m.selection = { sheetId: t.id, areas: [rect(0, 0, 1, 1)] };
      }
    });
  }
}

export class WorksheetProtectionProxy extends ProxyBase<SheetModel> {
  protected readonly entity = 'WorksheetProtection';
  protected readonly scalars = ['protected'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly ws: WorksheetProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw(): SheetModel {
    return this.ws.target();
  }
  protected read(t: SheetModel, prop: string): unknown {
    return prop === 'protected' ? t.protected : undefined;
  }
  get protected(): boolean { return this.get('protected'); }
  /** Protects the sheet. The sandbox then rejects every cell, format, rule, validation and table write on it with AccessDenied (Excel lets options allow some; not modelled). */
  protect(_options?: unknown, password?: string): void {
    this.call('protect', { password: password ? '***' : null }, (t) => {
      if (t.protected) throw err('InvalidOperation', `Sheet "${t.name}" is already protected.`, 'WorksheetProtection.protect');
      this.context.model.touch(t);
      t.protected = true;
      this.context.sandbox.passwords.set(t.id, password ?? '');
    });
  }
  unprotect(password?: string): void {
    this.call('unprotect', null, (t) => {
      const pw = this.context.sandbox.passwords.get(t.id) ?? '';
      if (t.protected && pw !== '' && pw !== password) throw err('InvalidArgument', 'The password is incorrect.', 'WorksheetProtection.unprotect');
      this.context.model.touch(t);
      t.protected = false;
    });
  }
}

late.WorksheetProxy = WorksheetProxy;
