/**
 * Argument parsing for `tailmark score`, `tailmark sandbox` and `tailmark demo`. No dependencies;
 * every mistake becomes a TailmarkError ('usage', or 'bad-settings' from the pipeline's one
 * validation) with one line that says what to fix.
 */
import { defaultSettings, SETTING_KEYS, SETTING_SPECS, validateSettings, type SettingKey, type SettingWords, type Settings, type SettingsInput } from '../pipeline/settings.js';
import { TailmarkError } from '../pipeline/errors.js';
import { ENCODINGS, encodingFromName, type TextEncodingName } from '../table/encoding.js';

/** The batch command's I/O choices; what to compute is `settings` (src/pipeline/settings.ts). */
export interface ScoreArgs {
  readonly input: string;
  readonly settings: Settings;
  readonly sheet: string | undefined;
  /**
   * How to read a text input: its encoding (default detected) and header row (default found below
   * any titles). They choose how the source becomes a table, so they are the reader's, not settings.
   */
  readonly encoding?: TextEncodingName;
  readonly headerRow?: number;
  readonly out: string | undefined;
  readonly force: boolean;
  readonly json: boolean;
  /** Force large-file mode (read and write row by row) whatever the size. */
  readonly stream: boolean;
  /** "I can review N claims": the cutoff becomes the one that flags at most N rows (src/pipeline/budget.ts). */
  readonly review?: number;
}

export interface DemoArgs {
  readonly out: string | undefined;
  readonly force: boolean;
}

type Spec = Record<string, 'flag' | 'value' | 'list'>;

/**
 * The option that sets each setting. A new setting needs an entry (the compiler says so); null = not
 * offered on the command line (it takes its default).
 */
export const SETTING_FLAGS: { readonly [K in SettingKey]: { readonly name: string; readonly kind: 'flag' | 'value' | 'list' } | null } = {
  valueColumns: { name: 'value', kind: 'list' },
  groupColumns: { name: 'group', kind: 'list' },
  idColumn: { name: 'id', kind: 'value' },
  method: { name: 'method', kind: 'value' },
  cutoff: { name: 'cutoff', kind: 'value' },
  direction: { name: 'direction', kind: 'value' },
  logScale: { name: 'log', kind: 'flag' },
  minGroupSize: { name: 'min-group', kind: 'value' },
  smallGroups: { name: 'small-groups', kind: 'value' },
  widen: { name: 'widen', kind: 'value' },
  // Two options, --decimal-comma and --decimal-point (see settingsFromOptions).
  decimal: null,
  reviewer: { name: 'reviewer', kind: 'value' },
  // The add-in's follow-up view only.
  detailColumns: null,
};

/** The option spec of every setting, for parseFlags. */
export function settingOptionSpec(): Spec {
  const spec: Spec = {};
  for (const k of SETTING_KEYS) {
    const f = SETTING_FLAGS[k];
    if (f) spec[f.name] = f.kind;
  }
  spec['decimal-comma'] = 'flag';
  spec['decimal-point'] = 'flag';
  return spec;
}

/** Messages name settings by their option, and show the value as typed. */
export function settingWords(opts: ReadonlyMap<string, readonly string[]>): SettingWords {
  return {
    nameOf: (k) => `--${SETTING_FLAGS[k]?.name ?? k}`,
    shown: (k, v) => {
      const f = SETTING_FLAGS[k];
      const raw = f ? opts.get(f.name) : undefined;
      return raw && f?.kind === 'value' ? `"${raw[0]}"` : JSON.stringify(v);
    },
  };
}

/**
 * Settings from parsed options: text becomes numbers and words, nothing is checked here (the
 * pipeline's validateSettings does, with `settingWords` for the wording). Missing options stay
 * missing, so the pipeline's defaults apply.
 */
export function settingsFromOptions(opts: ReadonlyMap<string, readonly string[]>): SettingsInput {
  const out: Record<string, unknown> = {};
  for (const k of SETTING_KEYS) {
    const f = SETTING_FLAGS[k];
    const raw = f ? opts.get(f.name) : undefined;
    if (!f || raw === undefined) continue;
    if (f.kind === 'flag') out[k] = true;
    else if (f.kind === 'list') out[k] = raw;
    else {
      const text = raw[0];
      const def = SETTING_SPECS[k].fallback(defaultSettings());
      if (typeof def === 'number') {
        // A whole-number setting must be written as one ("2.5", "1e1", "0x10" are not).
        const whole = Number.isInteger(def) && k !== 'cutoff';
        out[k] = text.trim() === '' || (whole && !/^\s*\d+\s*$/.test(text)) ? Number.NaN : Number(text);
      } else if (typeof def === 'string') out[k] = text.toLowerCase();
      else out[k] = text;
    }
  }
  const comma = opts.has('decimal-comma');
  const point = opts.has('decimal-point');
  if (comma && point) throw new TailmarkError('usage', 'give --decimal-comma or --decimal-point, not both');
  if (comma || point) out.decimal = comma ? 'comma' : 'point';
  return out;
}

export function parseFlags(argv: readonly string[], spec: Spec, command: string): { positional: string[]; opts: Map<string, string[]> } {
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
      if (!kind) throw new TailmarkError('usage', `unknown option --${name} for "${command}" (see tailmark --help)`);
      if (kind === 'flag') {
        if (eq >= 0) throw new TailmarkError('usage', `--${name} takes no value`);
        opts.set(name, ['']);
        continue;
      }
      let value: string | undefined;
      if (eq >= 0) value = a.slice(eq + 1);
      else {
        value = argv[i + 1];
        if (value === undefined || (value.startsWith('--') && value.length > 2)) throw new TailmarkError('usage', `--${name} needs a value`);
        i++;
      }
      const prev = opts.get(name);
      if (prev && kind === 'value') throw new TailmarkError('usage', `--${name} given more than once`);
      opts.set(name, [...(prev ?? []), value]);
      continue;
    }
    positional.push(a);
  }
  return { positional, opts };
}

export function parseScoreArgs(argv: readonly string[]): ScoreArgs {
  const { positional, opts } = parseFlags(
    argv,
    { ...settingOptionSpec(), sheet: 'value', encoding: 'value', 'header-row': 'value', out: 'value', force: 'flag', json: 'flag', stream: 'flag', review: 'value' },
    'score',
  );
  if (positional.length === 0) throw new TailmarkError('usage', 'score needs an input file: tailmark score <input.xlsx|input.csv> --value <header>');
  if (positional.length > 1) throw new TailmarkError('usage', `score takes one input file; got ${positional.length}: ${positional.join(' ')}`);
  if ((opts.get('value') ?? []).length === 0) throw new TailmarkError('usage', 'score needs at least one --value <header> (the amount column to score)');
  const one = (n: string) => opts.get(n)?.[0];
  // Checked now, so a mistake is reported before a long read.
  const settings = validateSettings(settingsFromOptions(opts), settingWords(opts));
  const encoding = encodingOption(one('encoding'));
  const headerRow = headerRowOption(one('header-row'));
  const review = reviewOption(one('review'));
  if (review !== undefined && opts.has('cutoff')) throw new TailmarkError('usage', '--review sets the cutoff: give --review or --cutoff, not both');
  return {
    input: positional[0],
    settings,
    sheet: one('sheet'),
    ...(encoding !== undefined ? { encoding } : {}),
    ...(headerRow !== undefined ? { headerRow } : {}),
    out: one('out'),
    force: opts.has('force'),
    json: opts.has('json'),
    stream: opts.has('stream'),
    ...(review !== undefined ? { review } : {}),
  };
}

function reviewOption(raw: string | undefined): number | undefined {
  if (raw === undefined) return undefined;
  if (!/^\d+$/.test(raw.trim()) || Number(raw) < 1) throw new TailmarkError('usage', `--review must be a whole number of claims of at least 1; got "${raw}"`);
  return Number(raw);
}

function encodingOption(raw: string | undefined): TextEncodingName | undefined {
  if (raw === undefined) return undefined;
  const e = encodingFromName(raw);
  if (e === null) throw new TailmarkError('usage', `--encoding must be one of ${ENCODINGS.join(', ')} (or utf8, utf16, latin1, cp1252); got "${raw}"`);
  return e;
}

function headerRowOption(raw: string | undefined): number | undefined {
  if (raw === undefined) return undefined;
  if (!/^\d+$/.test(raw.trim()) || Number(raw) < 1) throw new TailmarkError('usage', `--header-row must be a row number of at least 1; got "${raw}"`);
  return Number(raw);
}

export function parseDemoArgs(argv: readonly string[]): DemoArgs {
  const { positional, opts } = parseFlags(argv, { out: 'value', force: 'flag' }, 'demo');
  if (positional.length > 0) throw new TailmarkError('usage', `demo takes no file arguments (use --out <path>); got: ${positional.join(' ')}`);
  return { out: opts.get('out')?.[0], force: opts.has('force') };
}

export const HELP = `tailmark: flag expense claims that are unusual for their peer group

Usage:
  tailmark score <input.xlsx|input.csv|.tsv|.txt> --value <header> [options]
  tailmark demo [--out <path.xlsx>] [--force]
  tailmark sandbox <input.xlsx|input.csv> [score options] [--rerun] [--office-client] [--fail-sync <k>] [--out <path>] [--json]
  tailmark --help

score options:
  --value <header>        amount column to score (repeat for several)
  --group <header>        peer-group column, e.g. "Cost centre" (repeat; groups combine)
  --id <header>           claim identifier column, shown in --json output
  --method <m>            skew (default: fences from Tukey's hinges, the long side of a skewed group
                          widened by its medcouple) | adjusted (the adjusted boxplot) | robust
                          (median/MAD) | classic (mean/SD) | iqr (quartile fences)
  --cutoff <n>            score beyond which a claim is flagged (default skew k 3, adjusted/iqr k 1.5,
                          robust 3.5, classic 3)
  --direction <d>         high | low | both (default both)
  --review <n>            "I can review n claims": use the cutoff that flags at most n claims (rows flagged
                          in any --value column), as close to n as ties allow; says so when ties stop it short
  --min-group <n>         smallest group scored on its own (default 8)
  --small-groups <p>      pool (compare with a wider peer group, then the whole column; default) | skip (leave unscored)
  --widen <w>             with several --group columns, the wider peer group a small group is compared with
                          first: drop-first (let go of the first --group column: the same category across
                          every cost centre; default) | drop-last (the same cost centre across every
                          category) | column (straight to the whole column)
  --log                   score the logarithm of amounts (for skewed amounts; amounts <= 0 are left out)
  --decimal-comma         read text amounts with a decimal comma ("1.234,50" is 1234.5)
  --decimal-point         read text amounts with a decimal point ("1,234.50" is 1234.5)
                          (default: decided per column from its cells, and said in the notes)
  --encoding <e>          text encoding of a .csv/.tsv/.txt input: utf-8 | utf-16le | utf-16be | windows-1252
                          (default: from its byte-order mark, else UTF-8, else Windows-1252; said in the notes)
  --header-row <n>        row number of the header (default: the first row that looks like one, so
                          report titles and blank lines above it are skipped)
  --reviewer <name>       your name or initials, recorded with the run in the log sheet
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
