/** Tables: the collection, a table, its columns and rows. */
import { MAX_COLS, MAX_ROWS, type Rect, rect, intersect, parseAddress, contains } from './address.js';
import { CellError, WorkbookModel, SheetModel, interpretInput, type TableModel } from './model.js';
import { generalText } from './formula.js';
import type { SandboxContext } from './context.js';
import { err, late, assertWritable, ProxyBase, CollectionBase, SandboxClientResult, type LoadArg, type RangeTarget } from './proxy-base.js';
import { cellInput } from './cells.js';
import { RangeProxy } from './range-proxy.js';
import type { WorksheetProxy } from './worksheet-proxy.js';

interface TableTarget {
  readonly sheet: SheetModel;
  readonly id: string;
}

function findTable(m: WorkbookModel, id: string): { sheet: SheetModel; table: TableModel } | null {
  for (const sheet of m.sheets) {
    const table = sheet.tables.find((t) => t.id === id);
    if (table) return { sheet, table };
  }
  return null;
}

function tableNameOk(m: WorkbookModel, name: string, exceptId?: string): void {
  if (!/^[A-Za-z_\\][A-Za-z0-9_.\\]*$/.test(name) || name.length > 255 || /^[A-Za-z]{1,3}[0-9]+$/.test(name) || /^[RrCc]$/.test(name)) {
    throw err('InvalidArgument', `"${name}" is not a valid table name (start with a letter or _, no spaces, not a cell address).`, 'Table.name');
  }
  for (const s of m.sheets) for (const t of s.tables) {
    if (t.id !== exceptId && t.name.toLowerCase() === name.toLowerCase()) throw err('ItemAlreadyExists', `A table named "${name}" already exists.`, 'Table.name');
  }
}

export class TableCollectionProxy extends CollectionBase<WorkbookModel, TableProxy> {
  protected readonly entity = 'TableCollection';
  protected readonly scalars = ['count'] as const;
  readonly itemScalars = ['id', 'name', 'showHeaders', 'showTotals'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly ws: WorksheetProxy | null, private readonly inRange?: RangeProxy, private readonly fully = false) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.context.model;
  }
  protected read(t: WorkbookModel, prop: string): unknown {
    return prop === 'count' ? this.list(t).length : undefined;
  }
  get count(): number { return this.get('count'); }
  private all(m: WorkbookModel): { sheet: SheetModel; table: TableModel }[] {
    let sheets = m.sheets;
    let within: RangeTarget | null = null;
    if (this.inRange) { within = this.inRange.target(); sheets = [within.sheet]; }
    else if (this.ws) sheets = [this.ws.target()];
    const out: { sheet: SheetModel; table: TableModel }[] = [];
    for (const sheet of sheets) for (const table of sheet.tables) {
      if (within && !(this.fully ? contains(within.rect, table.rect) : intersect(within.rect, table.rect))) continue;
      out.push({ sheet, table });
    }
    return out;
  }
  protected list(m: WorkbookModel): TableProxy[] {
    return this.all(m).map(({ sheet, table }) => {
      const p = new TableProxy(this.context, `tables.getItem(${JSON.stringify(table.name)})`, false, () => ({ sheet, id: table.id }));
      p.bind({ sheet, id: table.id });
      return p;
    });
  }
  getItem(key: string): TableProxy {
    return new TableProxy(this.context, `${this.path}.getItem(${JSON.stringify(key)})`, false, () => this.find(key));
  }
  getItemOrNullObject(key: string): TableProxy {
    return new TableProxy(this.context, `${this.path}.getItemOrNullObject(${JSON.stringify(key)})`, true, () => this.find(key));
  }
  getItemAt(index: number): TableProxy {
    return new TableProxy(this.context, `${this.path}.getItemAt(${index})`, false, () => {
      const x = this.all(this.context.model)[index];
      return x ? { sheet: x.sheet, id: x.table.id } : null;
    });
  }
  getFirst(): TableProxy {
    return this.getItemAt(0);
  }
  private find(key: string): TableTarget | null {
    const x = this.all(this.context.model).find(({ table }) => table.name.toLowerCase() === key.toLowerCase() || table.id === key);
    return x ? { sheet: x.sheet, id: x.table.id } : null;
  }
  /**
   * Creates a table over `address` (string, optionally sheet-qualified, or a Range). With
   * hasHeaders false, Excel generates headers "Column1".. and shifts the data down one row (as the
   * docs say); a header-only range gets one empty data row. Overlapping another table fails with InvalidOperation.
   */
  add(address: string | RangeProxy, hasHeaders: boolean): TableProxy {
    let created: TableTarget | null = null;
    const p = new TableProxy(this.context, `${this.path}.add(...)`, false, () => created);
    this.context.enqueue({
      write: true,
      statement: `${this.path}.add(${typeof address === 'string' ? JSON.stringify(address) : address.path}, ${hasHeaders})`,
      payload: typeof address === 'string' ? address : null,
      run: () => {
        const m = this.context.model;
        let sheet: SheetModel;
        let r: Rect;
        if (typeof address === 'string') {
          const pa = parseAddress(address);
          if (!pa) throw err('InvalidArgument', `"${address}" is not a valid range address.`, 'TableCollection.add');
          const named = pa.sheet !== null ? m.sheetByName(pa.sheet) : undefined;
          if (pa.sheet !== null && !named) throw err('ItemNotFound', `Sheet "${pa.sheet}" does not exist.`, 'TableCollection.add');
          sheet = named ?? (this.ws ? this.ws.target() : m.activeSheet());
          r = pa.rect;
        } else {
          const t = address.target();
          sheet = t.sheet;
          r = t.rect;
        }
        assertWritable(sheet, 'TableCollection.add');
        if (r.rows === MAX_ROWS || r.cols === MAX_COLS) throw err('InvalidArgument', 'A table cannot span an entire row or column.', 'TableCollection.add');
        for (const s of m.sheets) for (const x of s.tables) {
          if (s === sheet && intersect(x.rect, r)) throw err('InvalidOperation', `A table can't overlap another table ("${x.name}").`, 'TableCollection.add');
        }
        m.touch(sheet);
        let tr = r;
        if (!hasHeaders) {
          m.insert(sheet, rect(r.r0, r.c0, 1, r.cols), 'Down');
          for (let j = 0; j < r.cols; j++) m.applyWrite(sheet, r.r0, r.c0 + j, { v: `Column${j + 1}`, f: undefined, qp: undefined });
          tr = rect(r.r0, r.c0, r.rows + 1, r.cols);
        } else {
          // Header cells must be distinct non-empty text: Excel fills blanks and renames duplicates.
          const seen = new Set<string>();
          for (let j = 0; j < r.cols; j++) {
            const v = m.readValue(sheet, r.r0, r.c0 + j);
            let name = v === null ? '' : generalText(v instanceof CellError ? v.code : v);
            if (name === '') name = `Column${j + 1}`;
            let unique = name;
            for (let k = 2; seen.has(unique.toLowerCase()); k++) unique = `${name}${k}`;
            seen.add(unique.toLowerCase());
            if (v === null || unique !== name || typeof v !== 'string') m.applyWrite(sheet, r.r0, r.c0 + j, { v: unique, f: undefined, qp: undefined });
          }
          if (r.rows === 1) tr = rect(r.r0, r.c0, 2, r.cols);
        }
        let i = 1;
        const names = new Set(m.sheets.flatMap((s) => s.tables.map((x) => x.name.toLowerCase())));
        while (names.has(`table${i}`)) i++;
        const table: TableModel = { id: m.newId('table'), name: `Table${i}`, rect: tr, showHeaders: true };
        sheet.tables.push(table);
        created = { sheet, id: table.id };
        p.bind(created);
      },
    });
    return p;
  }
}

export class TableProxy extends ProxyBase<TableTarget> {
  protected readonly entity = 'Table';
  protected readonly scalars = ['id', 'name', 'showHeaders', 'showTotals'] as const;
  readonly columns: TableColumnCollectionProxy;
  readonly rows: TableRowCollectionProxy;
  private _ws?: WorksheetProxy;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => TableTarget | null) {
    super(ctx, path, orNull);
    this.columns = new TableColumnCollectionProxy(ctx, `${path}.columns`, this);
    this.rows = new TableRowCollectionProxy(ctx, `${path}.rows`, this);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  protected override stillValid(t: TableTarget): boolean {
    return findTable(this.context.model, t.id) !== null;
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    if (name === 'columns') return this.columns;
    if (name === 'rows') return this.rows;
    if (name === 'worksheet') return this.worksheet;
    return undefined;
  }
  /** @internal */
  model(): { sheet: SheetModel; table: TableModel } {
    const t = this.target();
    const x = findTable(this.context.model, t.id);
    if (!x) throw err('ItemNotFound', 'The table no longer exists.', 'Table');
    return x;
  }
  protected read(t: TableTarget, prop: string): unknown {
    const x = findTable(this.context.model, t.id);
    if (!x) throw err('ItemNotFound', 'The table no longer exists.', 'Table');
    switch (prop) {
      case 'id': return x.table.id;
      case 'name': return x.table.name;
      case 'showHeaders': return x.table.showHeaders;
      case 'showTotals': return false;
    }
    return undefined;
  }
  get id(): string { return this.get('id'); }
  get name(): string { return this.get('name'); }
  set name(v: string) {
    this.setProp('name', v, () => {
      const x = this.model();
      tableNameOk(this.context.model, v, x.table.id);
      this.context.model.touch(x.sheet);
      x.table.name = v;
    });
  }
  get showHeaders(): boolean { return this.get('showHeaders'); }
  get showTotals(): boolean { return this.get('showTotals'); }
  get worksheet(): WorksheetProxy {
    return (this._ws ??= new late.WorksheetProxy(this.context, `${this.path}.worksheet`, false, () => this.model().sheet));
  }
  private part(name: string, f: (tr: Rect) => Rect): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.${name}()`, false, () => {
      const x = this.model();
      return { sheet: x.sheet, rect: f(x.table.rect) };
    });
  }
  getRange(): RangeProxy { return this.part('getRange', (r) => r); }
  getHeaderRowRange(): RangeProxy { return this.part('getHeaderRowRange', (r) => rect(r.r0, r.c0, 1, r.cols)); }
  getDataBodyRange(): RangeProxy { return this.part('getDataBodyRange', (r) => rect(r.r0 + 1, r.c0, r.rows - 1, r.cols)); }
  /** Deletes the table and its cells' contents and formats (Excel's Table.delete); convertToRange keeps the cells. */
  delete(): void {
    this.call('delete', null, () => {
      const x = this.model();
      assertWritable(x.sheet, 'Table.delete');
      const m = this.context.model;
      m.touch(x.sheet);
      x.sheet.tables = x.sheet.tables.filter((t) => t.id !== x.table.id);
      m.clear(x.sheet, x.table.rect, 'All');
    });
  }
  convertToRange(): RangeProxy {
    const r = new RangeProxy(this.context, `${this.path}.convertToRange()`, false, () => null);
    this.call('convertToRange', null, () => {
      const x = this.model();
      assertWritable(x.sheet, 'Table.convertToRange');
      this.context.model.touch(x.sheet);
      x.sheet.tables = x.sheet.tables.filter((t) => t.id !== x.table.id);
      r.bind({ sheet: x.sheet, rect: x.table.rect });
    });
    return r;
  }
}

interface ColumnTarget {
  readonly tableId: string;
  /** Column offset within the table at resolution time. */
  readonly index: number;
}

export class TableColumnCollectionProxy extends CollectionBase<TableTarget, TableColumnProxy> {
  protected readonly entity = 'TableColumnCollection';
  protected readonly scalars = ['count'] as const;
  readonly itemScalars = ['id', 'index', 'name', 'values'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly table: TableProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.table.target();
  }
  protected read(_t: TableTarget, prop: string): unknown {
    return prop === 'count' ? this.table.model().table.rect.cols : undefined;
  }
  get count(): number { return this.get('count'); }
  protected list(t: TableTarget): TableColumnProxy[] {
    const x = this.table.model();
    return Array.from({ length: x.table.rect.cols }, (_, i) => {
      const p = new TableColumnProxy(this.context, `${this.path}.getItemAt(${i})`, false, () => ({ tableId: t.id, index: i }), this.table);
      p.bind({ tableId: t.id, index: i });
      return p;
    });
  }
  override load(arg?: LoadArg): this {
    // Loading items without naming properties loads id/index/name (not values, to keep responses small).
    return super.load(arg ?? ['id', 'index', 'name']);
  }
  private byName(name: string): ColumnTarget | null {
    const x = this.table.model();
    const m = this.context.model;
    for (let j = 0; j < x.table.rect.cols; j++) {
      const v = m.readValue(x.sheet, x.table.rect.r0, x.table.rect.c0 + j);
      const h = v === null ? '' : generalText(v instanceof CellError ? v.code : v);
      if (h.toLowerCase() === name.toLowerCase() || String(j + 1) === name) return { tableId: x.table.id, index: j };
    }
    return null;
  }
  getItem(key: string | number): TableColumnProxy {
    return new TableColumnProxy(this.context, `${this.path}.getItem(${JSON.stringify(key)})`, false, () => this.byName(String(key)), this.table);
  }
  getItemOrNullObject(key: string | number): TableColumnProxy {
    return new TableColumnProxy(this.context, `${this.path}.getItemOrNullObject(${JSON.stringify(key)})`, true, () => this.byName(String(key)), this.table);
  }
  getItemAt(index: number): TableColumnProxy {
    return new TableColumnProxy(this.context, `${this.path}.getItemAt(${index})`, false, () => {
      const x = this.table.model();
      return index >= 0 && index < x.table.rect.cols ? { tableId: x.table.id, index } : null;
    }, this.table);
  }
  /**
   * Adds a column at `index` (null/-1/undefined = at the end). Cells in the table's rows from that
   * position shift right (sandbox choice; Excel may instead use an empty adjacent column).
   * `values` is a 2-D array of table-height rows x 1 (header first) or a scalar for every cell;
   * `name` overrides the header. Duplicate header names get a numeric suffix, as in Excel.
   */
  add(index?: number | null, values?: unknown, name?: string | null): TableColumnProxy {
    let created: ColumnTarget | null = null;
    const p = new TableColumnProxy(this.context, `${this.path}.add(...)`, false, () => created, this.table);
    this.context.enqueue({
      write: true,
      statement: `${this.path}.add(${index ?? null}, ..., ${JSON.stringify(name ?? null)})`,
      payload: { index: index ?? null, values: values ?? null, name: name ?? null },
      run: () => {
        const x = this.table.model();
        const m = this.context.model;
        assertWritable(x.sheet, 'TableColumnCollection.add');
        const tr = x.table.rect;
        const at = index === undefined || index === null || index === -1 ? tr.cols : index;
        if (!Number.isInteger(at) || at < 0 || at > tr.cols) throw err('InvalidArgument', `Column index ${index} is outside 0..${tr.cols}.`, 'TableColumnCollection.add');
        if (tr.c0 + tr.cols >= MAX_COLS) throw err('InvalidArgument', 'The table already reaches column XFD.', 'TableColumnCollection.add');
        let input: (i: number) => unknown = () => null;
        if (values !== undefined && values !== null) {
          if (Array.isArray(values)) {
            if (values.length !== tr.rows || values.some((row) => !Array.isArray(row) || row.length !== 1)) {
              throw err('InvalidArgument', `TableColumnCollection.add: values must be ${tr.rows} rows x 1 column (header row included).`, 'TableColumnCollection.add');
            }
            input = (i) => (values as unknown[][])[i][0];
          } else input = () => values;
        }
        const writes = Array.from({ length: tr.rows }, (_, i) => {
          const v = input(i);
          return v === null || v === undefined ? null : interpretInput(v, m.getAttr(x.sheet, tr.r0 + i, tr.c0 + at, 'nf'), 'TableColumnCollection.add');
        });
        const col = tr.c0 + at;
        m.insert(x.sheet, rect(tr.r0, col, tr.rows, 1), 'Right');
        const after = findTable(m, x.table.id)!;
        if (at === tr.cols) after.table.rect = rect(tr.r0, tr.c0, tr.rows, tr.cols + 1);
        for (let i = 1; i < tr.rows; i++) { const w = writes[i]; if (w) m.applyWrite(x.sheet, tr.r0 + i, col, w); }
        // Header: the name, else the header value, else "ColumnN"; made unique.
        let header = name ?? null;
        if (header === null) {
          const hv = values !== undefined && values !== null ? input(0) : null;
          header = hv === null || hv === undefined || hv === '' ? null : String(hv);
        }
        const existing = new Set<string>();
        for (let j = 0; j < after.table.rect.cols; j++) {
          if (after.table.rect.c0 + j === col) continue;
          const v = m.readValue(x.sheet, tr.r0, after.table.rect.c0 + j);
          existing.add((v === null ? '' : generalText(v instanceof CellError ? v.code : v)).toLowerCase());
        }
        let base = header ?? `Column${at + 1}`;
        if (header === null) { let k = at + 1; while (existing.has(`column${k}`)) k++; base = `Column${k}`; }
        let unique = base;
        for (let k = 2; existing.has(unique.toLowerCase()); k++) unique = `${base}${k}`;
        m.applyWrite(x.sheet, tr.r0, col, { v: unique, f: undefined, qp: undefined });
        created = { tableId: x.table.id, index: at };
        p.bind(created);
      },
    });
    return p;
  }
}

export class TableColumnProxy extends ProxyBase<ColumnTarget> {
  protected readonly entity = 'TableColumn';
  protected readonly scalars = ['id', 'index', 'name', 'values'] as const;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => ColumnTarget | null, private readonly table: TableProxy) {
    super(ctx, path, orNull);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  private where(t: ColumnTarget): { sheet: SheetModel; table: TableModel; col: number } {
    const x = findTable(this.context.model, t.tableId);
    if (!x || t.index >= x.table.rect.cols) throw err('ItemNotFound', 'The table column no longer exists.', 'TableColumn');
    return { ...x, col: x.table.rect.c0 + t.index };
  }
  protected read(t: ColumnTarget, prop: string): unknown {
    const { sheet, table, col } = this.where(t);
    const m = this.context.model;
    const val = (r: number) => {
      const v = m.readValue(sheet, r, col);
      return v === null ? '' : v instanceof CellError ? v.code : v;
    };
    switch (prop) {
      case 'id': return t.index + 1;
      case 'index': return t.index;
      case 'name': return generalText(val(table.rect.r0));
      case 'values': return Array.from({ length: table.rect.rows }, (_, i) => [val(table.rect.r0 + i)]);
    }
    return undefined;
  }
  get id(): number { return this.get('id'); }
  get index(): number { return this.get('index'); }
  get name(): string { return this.get('name'); }
  set name(v: string) {
    this.setProp('name', v, (t) => {
      const { sheet, table, col } = this.where(t);
      assertWritable(sheet, 'TableColumn.name');
      this.context.model.applyWrite(sheet, table.rect.r0, col, { v, f: undefined, qp: undefined });
    });
  }
  get values(): unknown[][] { return this.get('values'); }
  set values(v: unknown[][]) {
    this.setProp('values', v, (t) => {
      const { sheet, table, col } = this.where(t);
      assertWritable(sheet, 'TableColumn.values');
      const at = cellInput(v, rect(table.rect.r0, col, table.rect.rows, 1), 'TableColumn.values');
      const m = this.context.model;
      const writes = Array.from({ length: table.rect.rows }, (_, i) => {
        const x = at(i, 0);
        return x === null || x === undefined ? null : interpretInput(x, m.getAttr(sheet, table.rect.r0 + i, col, 'nf'), 'TableColumn.values');
      });
      writes.forEach((w, i) => { if (w) m.applyWrite(sheet, table.rect.r0 + i, col, w); });
    });
  }
  private part(name: string, f: (tr: Rect, col: number) => Rect): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.${name}()`, false, () => {
      const { sheet, table, col } = this.where(this.target());
      return { sheet, rect: f(table.rect, col) };
    });
  }
  getRange(): RangeProxy { return this.part('getRange', (r, c) => rect(r.r0, c, r.rows, 1)); }
  getHeaderRowRange(): RangeProxy { return this.part('getHeaderRowRange', (r, c) => rect(r.r0, c, 1, 1)); }
  getDataBodyRange(): RangeProxy { return this.part('getDataBodyRange', (r, c) => rect(r.r0 + 1, c, r.rows - 1, 1)); }
  /** Deletes the column's cells (table rows only), shifting cells on the right left. */
  delete(): void {
    this.call('delete', null, (t) => {
      const { sheet, table, col } = this.where(t);
      assertWritable(sheet, 'TableColumn.delete');
      if (table.rect.cols === 1) throw err('InvalidOperation', 'Cannot delete the only column of a table; delete the table instead.', 'TableColumn.delete');
      this.context.model.delete(sheet, rect(table.rect.r0, col, table.rect.rows, 1), 'Left');
    });
  }
  /** @internal */
  get owner(): TableProxy {
    return this.table;
  }
}

export class TableRowCollectionProxy extends ProxyBase<TableTarget> {
  protected readonly entity = 'TableRowCollection';
  protected readonly scalars = ['count'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly table: TableProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.table.target();
  }
  protected read(_t: TableTarget, prop: string): unknown {
    return prop === 'count' ? this.table.model().table.rect.rows - 1 : undefined;
  }
  get count(): number { return this.get('count'); }
  getCount(): SandboxClientResult<number> {
    return this.callResult('getCount', null, () => this.table.model().table.rect.rows - 1);
  }
  /** Appends/inserts data rows (cells below shift down within the table's columns). */
  add(index?: number | null, values?: unknown[][]): void {
    this.call('add', { index: index ?? null, values: values ?? null }, () => {
      const x = this.table.model();
      const m = this.context.model;
      assertWritable(x.sheet, 'TableRowCollection.add');
      const tr = x.table.rect;
      const n = values ? values.length : 1;
      if (values && values.some((r) => !Array.isArray(r) || r.length !== tr.cols)) throw err('InvalidArgument', `Each row must have ${tr.cols} values.`, 'TableRowCollection.add');
      const at = index === undefined || index === null || index === -1 ? tr.rows - 1 : index;
      if (!Number.isInteger(at) || at < 0 || at > tr.rows - 1) throw err('InvalidArgument', `Row index ${index} is outside 0..${tr.rows - 1}.`, 'TableRowCollection.add');
      const row = tr.r0 + 1 + at;
      m.insert(x.sheet, rect(row, tr.c0, n, tr.cols), 'Down');
      const after = findTable(m, x.table.id)!;
      if (at === tr.rows - 1) after.table.rect = rect(tr.r0, tr.c0, tr.rows + n, tr.cols);
      if (values) values.forEach((vr, i) => vr.forEach((v, j) => {
        const w = interpretInput(v, m.getAttr(x.sheet, row + i, tr.c0 + j, 'nf'), 'TableRowCollection.add');
        m.applyWrite(x.sheet, row + i, tr.c0 + j, w);
      }));
    });
  }
}

late.TableCollectionProxy = TableCollectionProxy;
