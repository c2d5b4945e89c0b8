/**
 * A small, honest formula evaluator for the sandbox's conditional-format checks, plus reference
 * rewriting when cells are inserted or deleted.
 *
 * Supported: number, string ("" escapes) and TRUE/FALSE literals; cell references A1 / $A$1 / $A1 /
 * A$1 on the rule's own sheet; operators unary + -, + - * / ^, & (concatenate), = <> < > <= >=;
 * functions AND, OR, NOT, IF, LEN, ABS, ISNUMBER, ISTEXT, ISBLANK, ISERROR, N.
 * Anything else (ranges such as A1:A5, other sheets, names, other functions) throws
 * `FormulaUnsupportedError` naming what it met, so a test never passes on a silently wrong result.
 *
 * Semantics follow Excel (Microsoft support, "Calculation operators and precedence"; function pages):
 * - precedence: unary minus, ^, * /, + -, &, comparisons (all left-associative).
 * - comparisons: an empty cell compares as 0 against a number, "" against text, FALSE against a
 *   boolean; otherwise numbers < text < booleans; text compares case-insensitively.
 * - AND/OR ignore text and empty cells reached through a reference, fail with #VALUE! on a text
 *   literal or when no logical value is found.
 * - errors propagate (#VALUE!, #DIV/0!, #REF!).
 * Cost: O(length of formula) to parse; evaluation O(number of nodes).
 */
import { columnIndex, columnLetters } from './address.js';

export class FormulaUnsupportedError extends Error {
  constructor(formula: string, what: string) {
    super(`Sandbox formula evaluator does not support ${what} in ${formula}`);
    this.name = 'FormulaUnsupportedError';
  }
}

/** An Excel error value such as #N/A. */
export class CellError {
  constructor(readonly code: string) {}
  toString(): string {
    return this.code;
  }
}

export const ERROR_LITERALS = ['#NULL!', '#DIV/0!', '#VALUE!', '#REF!', '#NAME?', '#NUM!', '#N/A', '#GETTING_DATA', '#SPILL!', '#CALC!', '#FIELD!', '#BLOCKED!', '#CONNECT!', '#BUSY!', '#UNKNOWN!'];

export type Scalar = number | string | boolean | CellError;
/** What a cell reference yields: a scalar or `null` for an empty cell. */
export type CellLookup = (row: number, col: number) => Scalar | null;

type Token =
  | { t: 'num'; v: number }
  | { t: 'str'; v: string }
  | { t: 'bool'; v: boolean }
  | { t: 'err'; v: string }
  | { t: 'ref'; row: number; col: number; absRow: boolean; absCol: boolean; start: number; end: number }
  | { t: 'func'; name: string }
  | { t: 'op'; v: string }
  | { t: 'lp' }
  | { t: 'rp' }
  | { t: 'comma' }
  | { t: 'colon' }
  | { t: 'bang' };

const colIndex = columnIndex;
const colLetters = columnLetters;

function tokenize(formula: string): Token[] {
  const src = formula.startsWith('=') ? formula.slice(1) : formula;
  const off = formula.length - src.length;
  const out: Token[] = [];
  let i = 0;
  while (i < src.length) {
    const ch = src[i];
    if (ch === ' ') { i++; continue; }
    if (ch === '"') {
      let s = '';
      i++;
      for (;;) {
        if (i >= src.length) throw new FormulaUnsupportedError(formula, 'an unterminated string');
        if (src[i] === '"') {
          if (src[i + 1] === '"') { s += '"'; i += 2; continue; }
          i++;
          break;
        }
        s += src[i++];
      }
      out.push({ t: 'str', v: s });
      continue;
    }
    if (ch === '#') {
      const e = ERROR_LITERALS.find((x) => src.startsWith(x, i));
      if (!e) throw new FormulaUnsupportedError(formula, `"${src.slice(i, i + 8)}"`);
      out.push({ t: 'err', v: e });
      i += e.length;
      continue;
    }
    const num = /^(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?/.exec(src.slice(i));
    if (num) { out.push({ t: 'num', v: Number(num[0]) }); i += num[0].length; continue; }
    const ref = /^(\$?)([A-Za-z]{1,3})(\$?)([0-9]{1,7})(?![A-Za-z0-9_(.])/.exec(src.slice(i));
    if (ref) {
      out.push({ t: 'ref', absCol: ref[1] === '$', col: colIndex(ref[2]), absRow: ref[3] === '$', row: Number(ref[4]) - 1, start: off + i, end: off + i + ref[0].length });
      i += ref[0].length;
      continue;
    }
    const word = /^[A-Za-z_][A-Za-z0-9_.]*/.exec(src.slice(i));
    if (word) {
      const w = word[0];
      const after = src.slice(i + w.length).trimStart();
      if (after.startsWith('(')) { out.push({ t: 'func', name: w.toUpperCase() }); i += w.length; continue; }
      if (w.toUpperCase() === 'TRUE' || w.toUpperCase() === 'FALSE') { out.push({ t: 'bool', v: w.toUpperCase() === 'TRUE' }); i += w.length; continue; }
      throw new FormulaUnsupportedError(formula, `the name "${w}"`);
    }
    if (src.startsWith('<>', i) || src.startsWith('<=', i) || src.startsWith('>=', i)) { out.push({ t: 'op', v: src.slice(i, i + 2) }); i += 2; continue; }
    if ('+-*/^&=<>'.includes(ch)) { out.push({ t: 'op', v: ch }); i++; continue; }
    if (ch === '(') { out.push({ t: 'lp' }); i++; continue; }
    if (ch === ')') { out.push({ t: 'rp' }); i++; continue; }
    if (ch === ',') { out.push({ t: 'comma' }); i++; continue; }
    if (ch === ':') { out.push({ t: 'colon' }); i++; continue; }
    if (ch === '!') { out.push({ t: 'bang' }); i++; continue; }
    if (ch === "'") throw new FormulaUnsupportedError(formula, 'references to other sheets');
    throw new FormulaUnsupportedError(formula, `the character "${ch}"`);
  }
  return out;
}

type Node =
  | { k: 'lit'; v: Scalar }
  | { k: 'ref'; row: number; col: number; absRow: boolean; absCol: boolean }
  | { k: 'un'; op: string; a: Node }
  | { k: 'bin'; op: string; a: Node; b: Node }
  | { k: 'call'; name: string; args: Node[] };

const SUPPORTED = new Set(['AND', 'OR', 'NOT', 'IF', 'LEN', 'ABS', 'ISNUMBER', 'ISTEXT', 'ISBLANK', 'ISERROR', 'N']);

function parse(formula: string): Node {
  const toks = tokenize(formula);
  let p = 0;
  const peek = () => toks[p];
  const isOp = (v: string[]) => { const t = toks[p]; return t !== undefined && t.t === 'op' && v.includes(t.v); };
  const prec: string[][] = [['=', '<>', '<', '>', '<=', '>='], ['&'], ['+', '-'], ['*', '/'], ['^']];
  function level(n: number): Node {
    if (n === prec.length) return unary();
    let a = level(n + 1);
    while (isOp(prec[n])) {
      const op = (toks[p++] as { v: string }).v;
      const b = level(n + 1);
      a = { k: 'bin', op, a, b };
    }
    return a;
  }
  function unary(): Node {
    if (isOp(['-', '+'])) {
      const op = (toks[p++] as { v: string }).v;
      return { k: 'un', op, a: unary() };
    }
    return primary();
  }
  function primary(): Node {
    const t = peek();
    if (!t) throw new FormulaUnsupportedError(formula, 'an incomplete expression');
    p++;
    switch (t.t) {
      case 'num': return { k: 'lit', v: t.v };
      case 'str': return { k: 'lit', v: t.v };
      case 'bool': return { k: 'lit', v: t.v };
      case 'err': return { k: 'lit', v: new CellError(t.v) };
      case 'ref': {
        const nx = peek();
        if (nx && nx.t === 'colon') throw new FormulaUnsupportedError(formula, 'range references (A1:B2)');
        if (nx && nx.t === 'bang') throw new FormulaUnsupportedError(formula, 'references to other sheets');
        return { k: 'ref', row: t.row, col: t.col, absRow: t.absRow, absCol: t.absCol };
      }
      case 'lp': {
        const e = level(0);
        if (peek()?.t !== 'rp') throw new FormulaUnsupportedError(formula, 'a missing ")"');
        p++;
        return e;
      }
      case 'func': {
        if (!SUPPORTED.has(t.name)) throw new FormulaUnsupportedError(formula, `the function ${t.name}`);
        p++; // (
        const args: Node[] = [];
        if (peek()?.t === 'rp') { p++; return { k: 'call', name: t.name, args }; }
        for (;;) {
          args.push(level(0));
          const nx = peek();
          if (nx?.t === 'comma') { p++; continue; }
          if (nx?.t === 'rp') { p++; break; }
          throw new FormulaUnsupportedError(formula, 'a malformed argument list');
        }
        return { k: 'call', name: t.name, args };
      }
      default:
        throw new FormulaUnsupportedError(formula, `an unexpected token "${t.t}"`);
    }
  }
  const node = level(0);
  if (p !== toks.length) throw new FormulaUnsupportedError(formula, 'trailing tokens');
  return node;
}

const cache = new Map<string, Node>();
function parsed(formula: string): Node {
  let n = cache.get(formula);
  if (!n) {
    n = parse(formula);
    if (cache.size > 500) cache.clear();
    cache.set(formula, n);
  }
  return n;
}

/** Text of a scalar as Excel shows it in General format (enough for LEN and &). */
export function generalText(v: Scalar | null): string {
  if (v === null) return '';
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  if (typeof v === 'number') {
    if (Number.isInteger(v) && Math.abs(v) < 1e11) return String(v);
    const s = Number(v.toPrecision(10)).toString();
    return s;
  }
  if (v instanceof CellError) return v.code;
  return v;
}

type Val = Scalar | null; // null: empty cell reached by a reference
const VALUE = () => new CellError('#VALUE!');

function toNumber(v: Val): number | CellError {
  if (v === null) return 0;
  if (v instanceof CellError) return v;
  if (typeof v === 'number') return v;
  if (typeof v === 'boolean') return v ? 1 : 0;
  const s = v.trim();
  if (s !== '' && /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(s)) return Number(s);
  return VALUE();
}

function compare(a: Val, b: Val): number {
  // Empty cells take the type of the other side.
  if (a === null && b === null) return 0;
  if (a === null) a = typeof b === 'number' ? 0 : typeof b === 'boolean' ? false : '';
  if (b === null) b = typeof a === 'number' ? 0 : typeof a === 'boolean' ? false : '';
  const rank = (x: Scalar) => (typeof x === 'number' ? 0 : typeof x === 'string' ? 1 : 2);
  const ra = rank(a);
  const rb = rank(b);
  if (ra !== rb) return ra - rb;
  if (typeof a === 'string' && typeof b === 'string') {
    const x = a.toLowerCase();
    const y = b.toLowerCase();
    return x < y ? -1 : x > y ? 1 : 0;
  }
  const x = Number(a);
  const y = Number(b);
  return x < y ? -1 : x > y ? 1 : 0;
}

interface EvalEnv {
  readonly lookup: CellLookup;
  readonly dRow: number;
  readonly dCol: number;
  readonly formula: string;
}

function evalNode(n: Node, env: EvalEnv): Val {
  switch (n.k) {
    case 'lit':
      return n.v;
    case 'ref': {
      const row = n.absRow ? n.row : n.row + env.dRow;
      const col = n.absCol ? n.col : n.col + env.dCol;
      if (row < 0 || col < 0 || row >= 1_048_576 || col >= 16_384) return new CellError('#REF!');
      return env.lookup(row, col);
    }
    case 'un': {
      const a = toNumber(evalNode(n.a, env));
      if (a instanceof CellError) return a;
      return n.op === '-' ? -a : a;
    }
    case 'bin': {
      const a = evalNode(n.a, env);
      const b = evalNode(n.b, env);
      if (a instanceof CellError) return a;
      if (b instanceof CellError) return b;
      if (n.op === '&') return generalText(a) + generalText(b);
      if (['=', '<>', '<', '>', '<=', '>='].includes(n.op)) {
        const c = compare(a, b);
        switch (n.op) {
          case '=': return c === 0;
          case '<>': return c !== 0;
          case '<': return c < 0;
          case '>': return c > 0;
          case '<=': return c <= 0;
          default: return c >= 0;
        }
      }
      const x = toNumber(a);
      const y = toNumber(b);
      if (x instanceof CellError) return x;
      if (y instanceof CellError) return y;
      switch (n.op) {
        case '+': return x + y;
        case '-': return x - y;
        case '*': return x * y;
        case '/': return y === 0 ? new CellError('#DIV/0!') : x / y;
        default: { const r = Math.pow(x, y); return Number.isFinite(r) ? r : new CellError('#NUM!'); }
      }
    }
    case 'call':
      return call(n, env);
  }
}

function arity(n: { name: string; args: Node[] }, min: number, max: number, env: EvalEnv): void {
  if (n.args.length < min || n.args.length > max) throw new FormulaUnsupportedError(env.formula, `${n.name} with ${n.args.length} arguments`);
}

function call(n: { name: string; args: Node[] }, env: EvalEnv): Val {
  switch (n.name) {
    case 'AND':
    case 'OR': {
      arity(n, 1, 255, env);
      let seen = false;
      let acc = n.name === 'AND';
      for (const a of n.args) {
        const v = evalNode(a, env);
        if (v instanceof CellError) return v;
        let b: boolean | null = null;
        if (typeof v === 'boolean') b = v;
        else if (typeof v === 'number') b = v !== 0;
        else if (typeof v === 'string') {
          if (a.k !== 'ref') {
            const u = v.toUpperCase();
            if (u === 'TRUE' || u === 'FALSE') b = u === 'TRUE';
            else return VALUE();
          }
        }
        if (b === null) continue;
        seen = true;
        acc = n.name === 'AND' ? acc && b : acc || b;
      }
      return seen ? acc : VALUE();
    }
    case 'NOT': {
      arity(n, 1, 1, env);
      const v = evalNode(n.args[0], env);
      if (v instanceof CellError) return v;
      if (typeof v === 'string') {
        const u = v.toUpperCase();
        if (u === 'TRUE' || u === 'FALSE') return u !== 'TRUE';
        return VALUE();
      }
      return !(v === null ? false : Boolean(v));
    }
    case 'IF': {
      arity(n, 1, 3, env);
      const c = evalNode(n.args[0], env);
      if (c instanceof CellError) return c;
      let b: boolean;
      if (typeof c === 'string') {
        const u = c.toUpperCase();
        if (u !== 'TRUE' && u !== 'FALSE') return VALUE();
        b = u === 'TRUE';
      } else b = c === null ? false : Boolean(c);
      if (b) return n.args.length >= 2 ? evalNode(n.args[1], env) ?? 0 : true;
      return n.args.length >= 3 ? evalNode(n.args[2], env) ?? 0 : false;
    }
    case 'LEN': {
      arity(n, 1, 1, env);
      const v = evalNode(n.args[0], env);
      if (v instanceof CellError) return v;
      return generalText(v).length;
    }
    case 'ABS': {
      arity(n, 1, 1, env);
      const v = toNumber(evalNode(n.args[0], env));
      return v instanceof CellError ? v : Math.abs(v);
    }
    case 'ISNUMBER': {
      arity(n, 1, 1, env);
      return typeof evalNode(n.args[0], env) === 'number';
    }
    case 'ISTEXT': {
      arity(n, 1, 1, env);
      return typeof evalNode(n.args[0], env) === 'string';
    }
    case 'ISERROR': {
      arity(n, 1, 1, env);
      return evalNode(n.args[0], env) instanceof CellError;
    }
    case 'ISBLANK': {
      arity(n, 1, 1, env);
      const a = n.args[0];
      // Only a reference to an empty cell is blank; "" is not.
      return a.k === 'ref' && evalNode(a, env) === null;
    }
    case 'N': {
      arity(n, 1, 1, env);
      const v = evalNode(n.args[0], env);
      if (v instanceof CellError) return v;
      if (typeof v === 'number') return v;
      if (typeof v === 'boolean') return v ? 1 : 0;
      return 0;
    }
    default:
      throw new FormulaUnsupportedError(env.formula, `the function ${n.name}`);
  }
}

/**
 * Evaluate `formula` as if entered in cell (row, col), where references in the text are written
 * relative to the anchor cell (anchorRow, anchorCol) — Excel's convention for conditional-format
 * rules, whose relative references are relative to the top-left cell of the range they apply to.
 * Returns the scalar result; an empty-cell result is returned as 0 (as Excel does for `=A1`).
 * Throws FormulaUnsupportedError for anything outside the supported subset.
 */
export function evaluateFormula(formula: string, lookup: CellLookup, row = 0, col = 0, anchorRow = 0, anchorCol = 0): Scalar {
  const node = parsed(formula);
  const v = evalNode(node, { lookup, dRow: row - anchorRow, dCol: col - anchorCol, formula });
  return v === null ? 0 : v;
}

/** Whether a conditional-format rule result counts as "true" (Excel: TRUE or a non-zero number). */
export function isTruthyRuleResult(v: Scalar): boolean {
  if (typeof v === 'boolean') return v;
  if (typeof v === 'number') return v !== 0;
  return false;
}

/**
 * Rewrite every same-sheet cell reference in `formula` through `move(row, col)`, which returns the
 * new position or null when the referenced cell was deleted (the reference becomes #REF!).
 * `$` markers are kept. Text inside string literals is never touched. Used when cells are
 * inserted or deleted. Formulas the tokenizer cannot read are returned unchanged.
 */
export function rewriteReferences(formula: string, move: (row: number, col: number) => { row: number; col: number } | null): string {
  let toks: Token[];
  try {
    toks = tokenize(formula);
  } catch {
    return formula;
  }
  let out = '';
  let last = 0;
  for (let i = 0; i < toks.length; i++) {
    const t = toks[i];
    if (t.t !== 'ref') continue;
    // A reference followed by "!" is a sheet name, not a cell; leave it.
    if (toks[i + 1]?.t === 'bang') continue;
    const m = move(t.row, t.col);
    out += formula.slice(last, t.start);
    out += m === null ? '#REF!' : `${t.absCol ? '$' : ''}${colLetters(m.col)}${t.absRow ? '$' : ''}${m.row + 1}`;
    last = t.end;
  }
  return out + formula.slice(last);
}
