/**
 * Finds every Excel / OfficeExtension API member that src/workbook/*.ts uses, with the
 * requirement set stated in @types/office-js ("[Api set: ExcelApi 1.x]"), using the TypeScript
 * checker (so `range.values` counts, `array.values()` does not).
 */
import path from 'node:path';
import { readdirSync } from 'node:fs';
import ts from 'typescript';

export interface UsedMember {
  /** "Range.getRangeByIndexes" */
  readonly member: string;
  /** "ExcelApi 1.7", or null when the declaration states none. */
  readonly apiSet: string | null;
  readonly files: readonly string[];
}

const ROOT = path.resolve(import.meta.dirname, '..', '..');

function apiSetOf(decl: ts.Declaration): string | null {
  const text = decl.getSourceFile().getFullText();
  const ranges = ts.getLeadingCommentRanges(text, decl.getFullStart()) ?? [];
  for (const r of ranges) {
    const m = /\[Api set: (ExcelApi [0-9.]+|ExcelApiOnline [0-9.]+)/.exec(text.slice(r.pos, r.end));
    if (m) return m[1];
  }
  return null;
}

function ownerName(decl: ts.Declaration): string | null {
  let n: ts.Node | undefined = decl.parent;
  while (n && !ts.isClassDeclaration(n) && !ts.isInterfaceDeclaration(n)) n = n.parent;
  if (!n || !(ts.isClassDeclaration(n) || ts.isInterfaceDeclaration(n)) || !n.name) return null;
  let ns: ts.Node | undefined = n.parent;
  while (ns && !ts.isModuleDeclaration(ns)) ns = ns.parent;
  const nsName = ns && ts.isModuleDeclaration(ns) ? ns.name.getText() : '';
  if (nsName !== 'Excel' && nsName !== 'OfficeExtension') return null;
  return `${nsName === 'Excel' ? '' : 'OfficeExtension.'}${n.name.text}`;
}

export function findUsedMembers(dir = path.join(ROOT, 'src', 'workbook')): UsedMember[] {
  const files = readdirSync(dir)
    .filter((f) => f.endsWith('.ts'))
    .map((f) => path.join(dir, f));
  const program = ts.createProgram(files, {
    target: ts.ScriptTarget.ES2022,
    module: ts.ModuleKind.NodeNext,
    moduleResolution: ts.ModuleResolutionKind.NodeNext,
    strict: true,
    skipLibCheck: true,
    noEmit: true,
    types: ['office-js'],
    lib: ['lib.es2022.d.ts', 'lib.dom.d.ts'],
  });
  const checker = program.getTypeChecker();
  const found = new Map<string, { apiSet: string | null; files: Set<string> }>();
  for (const sf of program.getSourceFiles()) {
    if (!files.includes(path.resolve(sf.fileName))) continue;
    const visit = (node: ts.Node) => {
      let nameNode: ts.Node | null = null;
      if (ts.isPropertyAccessExpression(node)) nameNode = node.name;
      else if (ts.isPropertyAssignment(node) || ts.isShorthandPropertyAssignment(node)) nameNode = node.name;
      if (nameNode) {
        let sym = checker.getSymbolAtLocation(nameNode);
        if ((ts.isPropertyAssignment(node) || ts.isShorthandPropertyAssignment(node)) && ts.isObjectLiteralExpression(node.parent)) {
          const ct = checker.getContextualType(node.parent);
          const p = ct ? checker.getPropertyOfType(ct, node.name.getText()) ?? ct.getNonNullableType().getProperty(node.name.getText()) : undefined;
          if (p) sym = p;
        }
        for (const d of sym?.declarations ?? []) {
          const owner = ownerName(d);
          if (!owner) continue;
          const member = `${owner}.${sym!.name}`;
          const e = found.get(member) ?? { apiSet: apiSetOf(d), files: new Set<string>() };
          e.files.add(path.basename(sf.fileName));
          found.set(member, e);
          break;
        }
      }
      ts.forEachChild(node, visit);
    };
    visit(sf);
  }
  return [...found].map(([member, e]) => ({ member, apiSet: e.apiSet, files: [...e.files].sort() })).sort((a, b) => a.member.localeCompare(b.member));
}
