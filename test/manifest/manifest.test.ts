/**
 * manifest.xml: converted with Microsoft's converter (offline) and validated against the JSON schema
 * shipped in @microsoft/app-manifest, plus structural checks of the XML itself. Element orders come
 * from the Office add-in manifest XSDs (TaskPaneAppVersionOverrides / OfficeApp 1.1, as listed in
 * Microsoft's "How to find the proper order of manifest elements").
 */
import { DOMParser } from '@xmldom/xmldom';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { convert } from 'office-addin-manifest-converter';
import { REQUIRED_EXCEL_API, REQUIRED_EXCEL_API_SET } from '../../src/workbook/api-members.js';

type XElement = Element;
const root = path.resolve(import.meta.dirname, '..', '..');
const manifestPath = path.join(root, 'manifest.xml');
const xml = readFileSync(manifestPath, 'utf8');
const doc = new DOMParser().parseFromString(xml, 'text/xml');
const office = doc.documentElement as unknown as XElement;

const children = (el: XElement): XElement[] => {
  const out: XElement[] = [];
  for (let n = el.firstChild; n; n = n.nextSibling) if (n.nodeType === 1) out.push(n as XElement);
  return out;
};
const local = (el: XElement) => el.localName ?? el.nodeName.replace(/^.*:/, '');
const all = (el: XElement): XElement[] => children(el).flatMap((c) => [c, ...all(c)]);
const child = (el: XElement, name: string) => {
  const c = children(el).find((x) => local(x) === name);
  if (!c) throw new Error(`<${local(el)}> has no <${name}>`);
  return c;
};
/** True when `names` (the actual child order) follows `order` (the schema sequence). */
function inOrder(names: string[], order: string[]): boolean {
  let at = 0;
  for (const n of names) {
    const i = order.indexOf(n, at);
    if (i < 0) return false;
    at = i;
  }
  return true;
}

/** Width and height from a PNG's IHDR chunk (PNG spec, ISO/IEC 15948 section 11.2.2). */
function pngSize(file: string): { width: number; height: number } {
  const b = readFileSync(file);
  expect(b.subarray(0, 8).toString('hex')).toBe('89504e470d0a1a0a');
  expect(b.subarray(12, 16).toString('ascii')).toBe('IHDR');
  return { width: b.readUInt32BE(16), height: b.readUInt32BE(20) };
}

describe('manifest.xml structure', () => {
  it('is a task pane add-in for Excel with its top-level elements in schema order', () => {
    expect(local(office)).toBe('OfficeApp');
    expect(office.getAttribute('xsi:type')).toBe('TaskPaneApp');
    const order = [
      'Id', 'AlternateId', 'Version', 'ProviderName', 'DefaultLocale', 'DisplayName', 'Description', 'IconUrl',
      'HighResolutionIconUrl', 'SupportUrl', 'AppDomains', 'Hosts', 'Requirements', 'DefaultSettings', 'Permissions',
      'Dictionary', 'VersionOverrides',
    ];
    const names = children(office).map(local);
    expect(inOrder(names, order), names.join(' ')).toBe(true);
    for (const required of ['Id', 'Version', 'ProviderName', 'DefaultLocale', 'DisplayName', 'Description', 'DefaultSettings', 'Permissions']) {
      expect(names).toContain(required);
    }
    expect(child(office, 'Id').textContent).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/);
    expect(child(child(office, 'Hosts'), 'Host').getAttribute('Name')).toBe('Workbook');
    expect(child(office, 'Permissions').textContent).toBe('ReadWriteDocument');
  });

  it('orders the VersionOverrides parts as the schema requires', () => {
    const vo = child(office, 'VersionOverrides');
    expect(inOrder(children(vo).map(local), ['Description', 'Requirements', 'Hosts', 'Resources', 'WebApplicationInfo', 'EquivalentAddins'])).toBe(true);
    const res = child(vo, 'Resources');
    expect(inOrder(children(res).map(local), ['Images', 'Urls', 'ShortStrings', 'LongStrings'])).toBe(true);
    const dff = child(child(child(vo, 'Hosts'), 'Host'), 'DesktopFormFactor');
    expect(inOrder(children(dff).map(local), ['GetStarted', 'FunctionFile', 'ExtensionPoint'])).toBe(true);
    for (const g of all(vo).filter((e) => local(e) === 'Group')) {
      expect(inOrder(children(g).map(local), ['Label', 'Icon', 'Control'])).toBe(true);
    }
    for (const c of all(vo).filter((e) => local(e) === 'Control')) {
      expect(inOrder(children(c).map(local), ['Label', 'Supertip', 'Icon', 'Action'])).toBe(true);
      expect(c.getAttribute('xsi:type')).toBe('Button');
    }
  });

  it('has unique ids and every resid points at a resource of the right kind', () => {
    const ids = all(office).map((e) => e.getAttribute('id')).filter((x): x is string => !!x);
    expect(new Set(ids).size).toBe(ids.length);
    const vo = child(office, 'VersionOverrides');
    const res = child(vo, 'Resources');
    const kinds: Record<string, Set<string>> = {};
    for (const group of children(res)) kinds[local(group)] = new Set(children(group).map((e) => e.getAttribute('id')!));
    const expectKind: Record<string, string> = {
      Image: 'Images', SourceLocation: 'Urls', FunctionFile: 'Urls', LearnMoreUrl: 'Urls', Label: 'ShortStrings', Title: 'ShortStrings', Description: 'LongStrings',
    };
    const refs = all(vo).filter((e) => e.getAttribute('resid'));
    expect(refs.length).toBeGreaterThan(5);
    for (const e of refs) {
      const kind = expectKind[local(e)];
      expect(kind, `<${local(e)} resid>`).toBeDefined();
      expect(kinds[kind].has(e.getAttribute('resid')!), `${local(e)} -> ${e.getAttribute('resid')}`).toBe(true);
    }
    // Our own labels, not another product's.
    expect([...kinds.ShortStrings].every((id) => id.startsWith('Tailmark.'))).toBe(true);
  });

  it('uses https URLs only', () => {
    const urls: string[] = [];
    for (const e of all(office)) {
      const v = e.getAttribute('DefaultValue');
      if (v && /^[a-z]+:\/\//i.test(v)) urls.push(v);
      if (local(e) === 'AppDomain') urls.push(e.textContent ?? '');
    }
    expect(urls.length).toBeGreaterThan(5);
    for (const u of urls) expect(u, u).toMatch(/^https:\/\/localhost:3000(\/|$)/);
    expect(child(child(office, 'DefaultSettings'), 'SourceLocation').getAttribute('DefaultValue')).toBe('https://localhost:3000/taskpane.html');
  });

  it('points at icon files that exist with the pixel size each place needs', () => {
    const file = (url: string) => path.join(root, new URL(url).pathname);
    const checks: [string, number][] = [
      // IconUrl 32 x 32 and HighResolutionIconUrl 64 x 64 (Microsoft's manifest reference).
      [child(office, 'IconUrl').getAttribute('DefaultValue')!, 32],
      [child(office, 'HighResolutionIconUrl').getAttribute('DefaultValue')!, 64],
    ];
    const vo = child(office, 'VersionOverrides');
    const images = new Map(children(child(child(vo, 'Resources'), 'Images')).map((e) => [e.getAttribute('id')!, e.getAttribute('DefaultValue')!]));
    for (const img of all(vo).filter((e) => local(e) === 'Image' && e.getAttribute('size'))) {
      checks.push([images.get(img.getAttribute('resid')!)!, Number(img.getAttribute('size'))]);
    }
    expect(checks.length).toBeGreaterThanOrEqual(8);
    for (const [url, size] of checks) {
      const f = file(url);
      expect(existsSync(f), f).toBe(true);
      expect(pngSize(f), url).toEqual({ width: size, height: size });
    }
    for (const size of [16, 32, 64, 80, 128]) expect(pngSize(path.join(root, 'assets', `icon-${size}.png`))).toEqual({ width: size, height: size });
  });

  it('declares exactly the ExcelApi requirement set the workbook layer needs, in both places', () => {
    const sets = all(office).filter((e) => local(e) === 'Set');
    expect(sets.length).toBe(2);
    for (const s of sets) {
      expect(s.getAttribute('Name')).toBe(REQUIRED_EXCEL_API_SET.name);
      expect(s.getAttribute('MinVersion')).toBe(REQUIRED_EXCEL_API);
    }
    const parents = sets.map((s) => local(s.parentNode!.parentNode as XElement));
    expect(parents).toEqual(['Requirements', 'Requirements']);
  });
});

describe('manifest conversion (office-addin-manifest-converter, offline) and JSON schema', () => {
  let out: string;
  let json: Record<string, unknown>;
  beforeAll(async () => {
    out = mkdtempSync(path.join(os.tmpdir(), 'tailmark-manifest-'));
    await convert(
      manifestPath,
      out,
      false,
      'https://developer.microsoft.com/json-schemas/teams/v1.23/MicrosoftTeams.schema.json',
      '1.23',
      false,
    );
    const file = readdirSync(out).find((f) => f.endsWith('.json'));
    if (!file) throw new Error(`converter wrote no JSON into ${out}`);
    json = JSON.parse(readFileSync(path.join(out, file), 'utf8')) as Record<string, unknown>;
  });
  afterAll(() => rmSync(out, { recursive: true, force: true }));

  it('validates against the v1.23 schema shipped in @microsoft/app-manifest', () => {
    // The package's own validator needs fs-extra, which it does not depend on; so validate with the
    // same ajv (draft-04) + ajv-formats it uses, resolved from the package, against its schema file.
    const fromRoot = createRequire(import.meta.url);
    const pkgMain = fromRoot.resolve('@microsoft/app-manifest');
    const fromPkg = createRequire(pkgMain);
    const schemaFile = path.join(path.dirname(pkgMain), 'json-schemas', 'teams', 'v1.23', 'MicrosoftTeams.schema.json');
    const schema = JSON.parse(readFileSync(schemaFile, 'utf8')) as Record<string, unknown>;
    expect(schema.$schema).toBe('http://json-schema.org/draft-04/schema#');
    type Validator = ((data: unknown) => boolean) & { errors?: unknown[] | null };
    type AjvCtor = new (o: Record<string, unknown>) => { compile(schema: unknown): Validator };
    const AjvDraft04 = (fromPkg('ajv-draft-04') as { default: AjvCtor }).default;
    const addFormats = (fromPkg('ajv-formats') as { default: (ajv: unknown) => void }).default;
    const ajv = new AjvDraft04({ allErrors: true, strict: false });
    addFormats(ajv);
    const validate = ajv.compile(schema);
    const ok = validate(json);
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
    expect(json.manifestVersion).toBe('1.23');
  });

  it('carries our names, the requirement set and the ribbon button over', () => {
    const name = json.name as { short: string };
    expect(name.short).toBe('Tailmark');
    const desc = json.description as { short: string };
    expect(desc.short).not.toMatch(/TRUNCATED/);
    const text = JSON.stringify(json);
    expect(text).toContain(`"name":"${REQUIRED_EXCEL_API_SET.name}","minVersion":"${REQUIRED_EXCEL_API}"`);
    expect(text).toContain('"builtInTabId":"TabHome"');
    expect(text).toContain('"page":"https://localhost:3000/taskpane.html"');
  });
});
