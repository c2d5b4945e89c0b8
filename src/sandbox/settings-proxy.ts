/** workbook.settings: a collection of JSON-serialisable key/value pairs. */
import type { WorkbookModel } from './model.js';
import type { SandboxContext } from './context.js';
import { err, CollectionBase, ProxyBase } from './proxy-base.js';

// ---------------------------------------------------------------- settings

export class SettingCollectionProxy extends CollectionBase<WorkbookModel, SettingProxy> {
  protected readonly entity = 'SettingCollection';
  protected readonly scalars = [] as const;
  readonly itemScalars = ['key', 'value'] as const;
  constructor(ctx: SandboxContext) {
    super(ctx, 'workbook.settings', false);
  }
  protected resolveRaw() {
    return this.context.model;
  }
  protected read(): unknown {
    return undefined;
  }
  protected list(t: WorkbookModel): SettingProxy[] {
    return [...t.settings.keys()].map((k) => {
      const p = new SettingProxy(this.context, `settings.getItem(${JSON.stringify(k)})`, false, () => (this.context.model.settings.has(k) ? k : null));
      p.bind(k);
      return p;
    });
  }
  /** Adds or replaces a setting. The value must be JSON-serialisable (else InvalidArgument). */
  add(key: string, value: unknown): SettingProxy {
    const p = new SettingProxy(this.context, `settings.getItem(${JSON.stringify(key)})`, false, () => (this.context.model.settings.has(key) ? key : null));
    this.context.enqueue({
      write: true,
      statement: `settings.add(${JSON.stringify(key)}, ...)`,
      payload: { key, value: value === undefined ? null : value },
      run: () => {
        if (typeof key !== 'string' || key.length === 0) throw err('InvalidArgument', 'A setting key must be a non-empty string.', 'SettingCollection.add');
        let json: string | undefined;
        try { json = JSON.stringify(value); } catch { json = undefined; }
        if (json === undefined) throw err('InvalidArgument', `Setting "${key}": the value is not JSON-serialisable.`, 'SettingCollection.add');
        this.context.model.settings.set(key, json);
        p.bind(key);
      },
    });
    p._data.key = key;
    p._data.value = value;
    return p;
  }
  getItem(key: string): SettingProxy {
    return new SettingProxy(this.context, `settings.getItem(${JSON.stringify(key)})`, false, () => (this.context.model.settings.has(key) ? key : null));
  }
  getItemOrNullObject(key: string): SettingProxy {
    return new SettingProxy(this.context, `settings.getItemOrNullObject(${JSON.stringify(key)})`, true, () => (this.context.model.settings.has(key) ? key : null));
  }
}

export class SettingProxy extends ProxyBase<string> {
  protected readonly entity = 'Setting';
  protected readonly scalars = ['key', 'value'] as const;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => string | null) {
    super(ctx, path, orNull);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  protected override stillValid(t: string): boolean {
    return this.context.model.settings.has(t);
  }
  protected read(t: string, prop: string): unknown {
    if (prop === 'key') return t;
    if (prop === 'value') return JSON.parse(this.context.model.settings.get(t)!);
    return undefined;
  }
  get key(): string { return this.get('key'); }
  get value(): unknown { return this.get('value'); }
  set value(v: unknown) {
    this.setProp('value', v, (t) => {
      let json: string | undefined;
      try { json = JSON.stringify(v); } catch { json = undefined; }
      if (json === undefined) throw err('InvalidArgument', `Setting "${t}": the value is not JSON-serialisable.`, 'Setting.value');
      this.context.model.settings.set(t, json);
    });
  }
  delete(): void {
    this.call('delete', null, (t) => { this.context.model.settings.delete(t); });
  }
}
