/**
 * Argument parsing for `tailmark score` and `tailmark demo`. No dependencies; every mistake becomes
 * a UsageError with one line that says what to fix.
 */
import { type DecimalMode, DIRECTIONS, METHOD_IDS, SMALL_GROUP_POLICIES, type Direction, type MethodId, type SmallGroupPolicy } from '../scoring/types.js';

export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export interface ScoreArgs {
  readonly input: string;
  readonly values: readonly string[];
  readonly groups: readonly string[];
  readonly id: string | null;
  readonly method: MethodId;
  readonly cutoff: number | undefined;
  readonly direction: Direction;
  readonly minGroup: number;
  readonly smallGroups: SmallGroupPolicy;
  readonly log: boolean;
  /** Decimal separator of text amounts: decided per column from its cells (auto), or given. */
  readonly decimal: DecimalMode;
  readonly sheet: string | undefined;
  readonly out: string | undefined;
  readonly force: boolean;
  readonly json: boolean;
  /** Force large-file mode (read and write row by row) whatever the size. */
  readonly stream: boolean;
}

export interface DemoArgs {
  readonly out: string | undefined;
  readonly force: boolean;
}

const METHODS: readonly MethodId[] = METHOD_IDS;
const POLICIES: readonly SmallGroupPolicy[] = SMALL_GROUP_POLICIES;

type Spec = Record<string, 'flag' | 'value' | 'list'>;

function parseFlags(argv: readonly string[], spec: Spec, command: string): { positional: string[]; opts: Map<string, string[]> } {
  const positional: string[] = [];
  const opts = new Map<string, string[]>();
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--') {
      positional.push(...argv.slice(i + 1));
      break;
    }
    if (a.startsWith('--')) {
      const eq = a.indexOf('=');
      const name = eq >= 0 ? a.slice(2, eq) : a.slice(2);
      const kind = spec[name];
      if (!kind) throw new UsageError(`unknown option --${name} for "${command}" (see tailmark --help)`);
      if (kind === 'flag') {
        if (eq >= 0) throw new UsageError(`--${name} takes no value`);
        opts.set(name, ['']);
        continue;
      }
      let value: string | undefined;
      if (eq >= 0) value = a.slice(eq + 1);
      else {
        value = argv[i + 1];
        if (value === undefined || (value.startsWith('--') && value.length > 2)) throw new UsageError(`--${name} needs a value`);
        i++;
      }
      const prev = opts.get(name);
      if (prev && kind === 'value') throw new UsageError(`--${name} given more than once`);
      opts.set(name, [...(prev ?? []), value]);
      continue;
    }
    positional.push(a);
  }
  return { positional, opts };
}

function oneOf<T extends string>(name: string, raw: string | undefined, allowed: readonly T[], fallback: T): T {
  if (raw === undefined) return fallback;
  const v = raw.toLowerCase() as T;
  if (!allowed.includes(v)) throw new UsageError(`--${name} must be one of ${allowed.join(', ')}; got "${raw}"`);
  return v;
}

export function parseScoreArgs(argv: readonly string[]): ScoreArgs {
  const { positional, opts } = parseFlags(
    argv,
    {
      value: 'list', group: 'list', id: 'value', method: 'value', cutoff: 'value', direction: 'value',
      'min-group': 'value', 'small-groups': 'value', log: 'flag', 'decimal-comma': 'flag', 'decimal-point': 'flag', sheet: 'value',
      out: 'value', force: 'flag', json: 'flag', stream: 'flag',
    },
    'score',
  );
  if (positional.length === 0) throw new UsageError('score needs an input file: tailmark score <input.xlsx|input.csv> --value <header>');
  if (positional.length > 1) throw new UsageError(`score takes one input file; got ${positional.length}: ${positional.join(' ')}`);
  const values = opts.get('value') ?? [];
  if (values.length === 0) throw new UsageError('score needs at least one --value <header> (the amount column to score)');
  const one = (n: string) => opts.get(n)?.[0];

  let cutoff: number | undefined;
  const rawCutoff = one('cutoff');
  if (rawCutoff !== undefined) {
    cutoff = Number(rawCutoff);
    if (rawCutoff.trim() === '' || !Number.isFinite(cutoff) || cutoff <= 0) {
      throw new UsageError(`--cutoff must be a number above 0; got "${rawCutoff}"`);
    }
  }
  let minGroup = 8;
  const rawMin = one('min-group');
  if (rawMin !== undefined) {
    minGroup = Number(rawMin);
    if (!/^\d+$/.test(rawMin.trim()) || minGroup < 1) throw new UsageError(`--min-group must be a whole number of at least 1; got "${rawMin}"`);
  }
  const id = one('id');
  return {
    input: positional[0],
    values,
    groups: opts.get('group') ?? [],
    id: id ?? null,
    method: oneOf('method', one('method'), METHODS, 'robust'),
    cutoff,
    direction: oneOf('direction', one('direction'), DIRECTIONS, 'both'),
    minGroup,
    smallGroups: oneOf('small-groups', one('small-groups'), POLICIES, 'pool'),
    log: opts.has('log'),
    decimal: decimalOption(opts.has('decimal-comma'), opts.has('decimal-point')),
    sheet: one('sheet'),
    out: one('out'),
    force: opts.has('force'),
    json: opts.has('json'),
    stream: opts.has('stream'),
  };
}

function decimalOption(comma: boolean, point: boolean): DecimalMode {
  if (comma && point) throw new UsageError('give --decimal-comma or --decimal-point, not both');
  return comma ? 'comma' : point ? 'point' : 'auto';
}

export function parseDemoArgs(argv: readonly string[]): DemoArgs {
  const { positional, opts } = parseFlags(argv, { out: 'value', force: 'flag' }, 'demo');
  if (positional.length > 0) throw new UsageError(`demo takes no file arguments (use --out <path>); got: ${positional.join(' ')}`);
  return { out: opts.get('out')?.[0], force: opts.has('force') };
}

export const HELP = `tailmark: flag expense claims that are unusual for their peer group

Usage:
  tailmark score <input.xlsx|input.csv> --value <header> [options]
  tailmark demo [--out <path.xlsx>] [--force]
  tailmark sandbox ...
  tailmark --help

score options:
  --value <header>        amount column to score (repeat for several)
  --group <header>        peer-group column, e.g. "Cost centre" (repeat; groups combine)
  --id <header>           claim identifier column, shown in --json output
  --method <m>            robust (median/MAD, default) | classic (mean/SD) | iqr (quartile fences)
  --cutoff <n>            score beyond which a claim is flagged (default robust 3.5, classic 3, iqr k 1.5)
  --direction <d>         high | low | both (default both)
  --min-group <n>         smallest group scored on its own (default 8)
  --small-groups <p>      pool (compare with the whole column, default) | skip (leave unscored)
  --log                   score the logarithm of amounts (for skewed amounts; amounts <= 0 are left out)
  --decimal-comma         read text amounts with a decimal comma ("1.234,50" is 1234.5)
  --decimal-point         read text amounts with a decimal point ("1,234.50" is 1234.5)
                          (default: decided per column from its cells, and said in the notes)
  --sheet <name>          worksheet to read (.xlsx; default the first)
  --out <output.xlsx>     where to write the scored workbook (default <input>-tailmark.xlsx beside the input)
  --force                 replace --out if it exists (the input itself is never replaced)
  --json                  print results as JSON on stdout; writes a workbook only when --out is given
  --stream                large-file mode whatever the size: read and write row by row (used on its own
                          for CSV input and for sheets above 50,000 rows, or TAILMARK_STREAM_ROWS);
                          keeps values, formulas, formats and rules; the notes sheet lists anything left out

demo writes an invented claims workbook and its scored copy (default out/demo-claims.xlsx and
out/demo-claims-scored.xlsx).

Exit codes: 0 success (whether or not claims were flagged), 2 bad input or options, 1 unexpected failure.
A flag means "look here", not misconduct; follow your organisation's policy and local law.
`;
