// The sandbox's small formula evaluator. Expected results are Excel's documented behaviour:
// Microsoft support "AND function" (text and empty cells in references are ignored; no logical
// values gives #VALUE!), "ISBLANK function", "N function", "LEN function", "Calculation operators
// and precedence in Excel" (comparison of mixed types: numbers < text < logicals; text compares
// case-insensitively). Cases marked "from memory" are Excel results recalled, not looked up.
import { describe, expect, it } from 'vitest';
import { evaluateFormula, FormulaUnsupportedError, CellError, rewriteReferences } from '../../src/sandbox/index.js';
import type { Scalar } from '../../src/sandbox/formula.js';

// A small grid: A1=5, A2="abc", A3 empty, A4=TRUE, A5="", B1=-3.5, B2=#N/A (error)
const grid = new Map<string, Scalar>([
  ['0,0', 5], ['1,0', 'abc'], ['3,0', true], ['4,0', ''], ['0,1', -3.5], ['1,1', new CellError('#N/A')],
]);
const look = (r: number, c: number) => grid.get(`${r},${c}`) ?? null;
const ev = (f: string, row = 0, col = 0, ar = 0, ac = 0) => evaluateFormula(f, look, row, col, ar, ac);

describe('evaluateFormula', () => {
  it('literals and arithmetic with precedence', () => {
    expect(ev('=1+2*3')).toBe(7);
    expect(ev('=-2^2')).toBe(4); // Excel: negation binds before ^ (Microsoft, operator precedence)
    expect(ev('=(1+2)*3')).toBe(9);
    expect(ev('="a""b"')).toBe('a"b');
    expect(ev('=1/0')).toEqual(new CellError('#DIV/0!'));
    expect(ev('="x"&A1')).toBe('x5');
  });

  it('comparisons, including empty cells and mixed types', () => {
    expect(ev('=A1>=5')).toBe(true);
    expect(ev('=A3=0')).toBe(true); // empty compares as 0 with a number
    expect(ev('=A3=""')).toBe(true); // and as "" with text
    expect(ev('=A2="ABC"')).toBe(true); // case-insensitive
    expect(ev('=A2>99')).toBe(true); // text > numbers
    expect(ev('=A4>"zzz"')).toBe(true); // logicals > text
    expect(ev('=1<>1')).toBe(false);
    expect(ev('=B2>0')).toEqual(new CellError('#N/A')); // errors propagate
  });

  it('AND / OR / NOT follow Excel', () => {
    expect(ev('=AND(A1>0,B1<0)')).toBe(true);
    expect(ev('=AND(A1,A2)')).toBe(true); // text via a reference is ignored
    expect(ev('=AND(A2,A3)')).toEqual(new CellError('#VALUE!')); // no logical values
    expect(ev('=AND("x",TRUE)')).toEqual(new CellError('#VALUE!')); // a text literal is an error
    expect(ev('=OR(A3,0,FALSE)')).toBe(false);
    expect(ev('=OR(0,B1)')).toBe(true);
    expect(ev('=NOT(A1>9)')).toBe(true);
  });

  it('LEN, ISNUMBER, ISBLANK, N, ABS, IF, ISERROR', () => {
    expect(ev('=LEN(A2)')).toBe(3);
    expect(ev('=LEN(B1)')).toBe(4); // "-3.5"
    expect(ev('=LEN(A3)')).toBe(0);
    expect(ev('=ISNUMBER(A1)')).toBe(true);
    expect(ev('=ISNUMBER(A2)')).toBe(false);
    expect(ev('=ISNUMBER(A3)')).toBe(false);
    expect(ev('=ISBLANK(A3)')).toBe(true);
    expect(ev('=ISBLANK(A5)')).toBe(false); // "" is not blank
    expect(ev('=N(A2)')).toBe(0);
    expect(ev('=N(A4)')).toBe(1);
    expect(ev('=ABS(B1)')).toBe(3.5);
    expect(ev('=IF(A1>1,"big","small")')).toBe('big');
    expect(ev('=ISERROR(B2)')).toBe(true);
  });

  it('relative references move with the evaluated cell; $ parts stay', () => {
    // Rule anchored at A1, evaluated at B2: A1 -> B2, $A1 -> A2, A$1 -> B1, $A$1 -> A1.
    expect(ev('=A1', 1, 1, 0, 0)).toEqual(new CellError('#N/A')); // B2
    expect(ev('=$A1', 1, 1, 0, 0)).toBe('abc'); // A2
    expect(ev('=A$1', 1, 1, 0, 0)).toBe(-3.5); // B1
    expect(ev('=$A$1', 1, 1, 0, 0)).toBe(5);
    expect(ev('=A1', 0, 0, 1, 0)).toEqual(new CellError('#REF!')); // moved above row 1
  });

  it('anything unsupported throws a clear error instead of guessing', () => {
    expect(() => ev('=SUM(A1:A3)')).toThrow(FormulaUnsupportedError);
    expect(() => ev('=SUM(A1)')).toThrow(/SUM/);
    expect(() => ev('=A1:A3')).toThrow(/range/);
    expect(() => ev('=Sheet2!A1')).toThrow(/other sheets|name/);
    expect(() => ev('=myName>1')).toThrow(/myName/);
  });
});

describe('rewriteReferences', () => {
  it('moves references and leaves strings alone', () => {
    const shiftCols = (row: number, col: number) => (col >= 1 ? { row, col: col + 2 } : { row, col });
    expect(rewriteReferences('=AND($B2>0,A1="B2",$C$3<>"")', shiftCols)).toBe('=AND($D2>0,A1="B2",$E$3<>"")');
    expect(rewriteReferences('=B2+1', () => null)).toBe('=#REF!+1');
  });
});
