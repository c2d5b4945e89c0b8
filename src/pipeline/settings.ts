/**
 * The run's settings: one type, one set of defaults, one validation, one mapping to the engine.
 *
 * ADD A SETTING HERE (and only here):
 *  1. add the field to `Settings` below, with a doc comment;
 *  2. add its entry to `SETTING_SPECS` (label, default, check): the compiler insists, and the saved
 *     workbook settings, the batch command and the pane all read defaults and bounds from there;
 *     a workbook saved before the field existed loads with the default;
 *  3. if the engine needs it, pass it on in `engineOptions`; if the batch command offers it, give
 *     it an option name in `SETTING_FLAGS` (src/cli/args.ts) - the compiler points there too.
 * Never re-check a setting elsewhere: hosts call `validateSettings` (or `settingsFromSaved`) and
 * take what it returns.
 */
import {
  DEFAULT_OPTIONS,
  DECIMAL_MODES,
  DIRECTIONS,
  METHOD_IDS,
  SMALL_GROUP_POLICIES,
  WIDEN_ORDERS,
  type DecimalMode,
  type Direction,
  type MethodId,
  type ScoreOptions,
  type SmallGroupPolicy,
  type WidenOrder,
} from '../scoring/types.js';
import { defaultCutoff } from '../scoring/cutoff.js';
import { TailmarkError } from './errors.js';

/** What the reviewer chose for a run; saved in the workbook and offered again next period. */
export interface Settings {
  /** Amount columns to score (headers). At least one. */
  readonly valueColumns: readonly string[];
  /** Peer-group key columns (headers); none = the whole column is one group. */
  readonly groupColumns: readonly string[];
  /** Claim identifier column (header): keeps review marks with their claim on a re-run; null = by row. */
  readonly idColumn: string | null;
  readonly method: MethodId;
  /** Cutoff on the method's score (IQR: the fence multiplier k). Above 0; default per method. */
  readonly cutoff: number;
  readonly direction: Direction;
  /** Score ln(amount); amounts <= 0 are left out. */
  readonly logScale: boolean;
  /** Smallest group scored on its own. */
  readonly minGroupSize: number;
  /** What happens to smaller groups. */
  readonly smallGroups: SmallGroupPolicy;
  /**
   * With several group columns, the wider peer group a small group is compared with before the
   * whole column: let go of the first group column first ('drop-first': the same category across
   * every cost centre), of the last ('drop-last'), or straight to the whole column ('column').
   */
  readonly widen: WidenOrder;
  /** Decimal separator of text amounts: 'auto' decides per column from its cells (said in the notes), or given. */
  readonly decimal: DecimalMode;
  /**
   * Name or initials recorded in the log sheet with each run and status change; null = not given.
   * Office gives add-ins no user identity without sign-in, so this is what the reviewer typed.
   */
  readonly reviewer: string | null;
  /** Columns the pane's follow-up view shows with each claim (headers); null = the pane's guess. */
  readonly detailColumns: readonly string[] | null;
}

export type SettingKey = keyof Settings;

/** Settings as a host gathers them: anything may be missing (defaults fill in) or wrong (validation says so). */
export type SettingsInput = { readonly [K in SettingKey]?: unknown };

interface Spec<T> {
  /** What the setting is called in messages when the host gives no name of its own. */
  readonly label: string;
  /** The default, given the other settings chosen so far (the cutoff depends on the method). */
  readonly fallback: (s: { readonly method: MethodId }) => T;
  /** null when `v` is a valid value; else what is wrong, worded to follow the setting's name ("must be ..."). */
  readonly check: (v: unknown) => string | null;
}

const isStringList = (v: unknown): v is string[] => Array.isArray(v) && v.every((x) => typeof x === 'string');
const oneOf = (allowed: readonly string[]) => (v: unknown) =>
  typeof v === 'string' && allowed.includes(v) ? null : `must be one of ${allowed.join(', ')}`;
const flag = (v: unknown) => (typeof v === 'boolean' ? null : 'must be true or false');

export const SETTING_SPECS: { readonly [K in SettingKey]: Spec<Settings[K]> } = {
  valueColumns: {
    label: 'The amount columns',
    fallback: () => [],
    check: (v) => (!isStringList(v) ? 'must be a list of column headers' : v.length === 0 ? 'must name at least one column to score' : null),
  },
  groupColumns: {
    label: 'The group columns',
    fallback: () => [],
    check: (v) => (isStringList(v) ? null : 'must be a list of column headers'),
  },
  idColumn: {
    label: 'The claim ID column',
    fallback: () => null,
    check: (v) => (v === null || typeof v === 'string' ? null : 'must be a column header or none'),
  },
  method: { label: 'The method', fallback: () => DEFAULT_OPTIONS.method, check: oneOf(METHOD_IDS) },
  cutoff: {
    label: 'The cutoff',
    fallback: (s) => defaultCutoff(s.method),
    check: (v) => (typeof v === 'number' && Number.isFinite(v) && v > 0 ? null : 'must be a number above 0'),
  },
  direction: { label: 'The direction', fallback: () => 'both', check: oneOf(DIRECTIONS) },
  logScale: { label: 'Log scale', fallback: () => false, check: flag },
  minGroupSize: {
    label: 'The minimum group size',
    fallback: () => 8,
    check: (v) => (typeof v === 'number' && Number.isInteger(v) && v >= 1 ? null : 'must be a whole number of at least 1'),
  },
  smallGroups: { label: 'The small-group choice', fallback: () => 'pool', check: oneOf(SMALL_GROUP_POLICIES) },
  widen: { label: 'The wider peer group', fallback: () => 'drop-first', check: oneOf(WIDEN_ORDERS) },
  decimal: { label: 'The decimal separator', fallback: () => 'auto', check: oneOf(DECIMAL_MODES) },
  reviewer: {
    label: 'The reviewer name',
    fallback: () => null,
    check: (v) =>
      v === null || (typeof v === 'string' && v.trim() !== '' && v.length <= 60) ? null : 'must be a name or initials of 1 to 60 characters',
  },
  detailColumns: {
    label: 'The follow-up columns',
    fallback: () => null,
    check: (v) => (v === null || isStringList(v) ? null : 'must be a list of column headers or none'),
  },
};

export const SETTING_KEYS = Object.keys(SETTING_SPECS) as SettingKey[];

/** How a host names a setting and shows the value it was given, in messages. */
export interface SettingWords {
  /** e.g. the batch command's "--cutoff"; default the spec's label. */
  readonly nameOf?: (key: SettingKey) => string;
  /** The value as the user typed it (e.g. the raw option text); default JSON of the value. */
  readonly shown?: (key: SettingKey, value: unknown) => string;
}

function shownValue(v: unknown): string {
  if (typeof v === 'number' && !Number.isFinite(v)) return String(v);
  return JSON.stringify(v) ?? String(v);
}

/** The defaults of every setting for `method` (no columns chosen). */
export function defaultSettings(method: MethodId = DEFAULT_OPTIONS.method): Settings {
  return completeSettings({ method });
}

/** Fill in defaults for missing settings, without checking the ones given. */
function completeSettings(input: SettingsInput): Settings {
  const method = (METHOD_IDS as readonly unknown[]).includes(input.method) ? (input.method as MethodId) : SETTING_SPECS.method.fallback({ method: DEFAULT_OPTIONS.method });
  const out: Record<string, unknown> = {};
  for (const key of SETTING_KEYS) {
    const v = input[key];
    out[key] = v === undefined ? SETTING_SPECS[key].fallback({ method }) : v;
  }
  return out as unknown as Settings;
}

/**
 * The one validation: fills in defaults (the cutoff follows the method), checks each setting's
 * bounds and the settings together, and returns them typed. Throws TailmarkError('bad-settings')
 * naming the first setting that is wrong and what it must be.
 */
export function validateSettings(input: SettingsInput, words: SettingWords = {}): Settings {
  const s = completeSettings(input);
  const nameOf = words.nameOf ?? ((k: SettingKey) => SETTING_SPECS[k].label);
  for (const key of SETTING_KEYS) {
    const problem = SETTING_SPECS[key].check(s[key]);
    if (problem !== null) {
      const shown = words.shown ? words.shown(key, s[key]) : shownValue(s[key]);
      throw new TailmarkError('bad-settings', `${nameOf(key)} ${problem}; got ${shown}`);
    }
  }
  for (const v of s.valueColumns) {
    if (s.groupColumns.includes(v)) {
      const both = words.nameOf ? `${words.nameOf('valueColumns')} and as ${words.nameOf('groupColumns')}` : 'an amount column and as a group column';
      throw new TailmarkError('bad-settings', `"${v}" is given both as ${both}`);
    }
  }
  if (new Set(s.valueColumns).size !== s.valueColumns.length) {
    throw new TailmarkError('bad-settings', `the same column is given twice in ${nameOf('valueColumns')}`);
  }
  return s;
}

/**
 * Settings read back from storage (a workbook's saved settings, as JSON text or an object), or null
 * when absent or not valid. A field saved by an older version that is missing takes its default.
 */
export function settingsFromSaved(value: unknown): Settings | null {
  let o = value;
  if (typeof o === 'string') {
    try {
      o = JSON.parse(o) as unknown;
    } catch {
      return null;
    }
  }
  if (typeof o !== 'object' || o === null || Array.isArray(o)) return null;
  const given = o as Record<string, unknown>;
  const input: Record<string, unknown> = {};
  for (const key of SETTING_KEYS) if (key in given) input[key] = given[key];
  // Saved before the decimal separator was decided per column: a ticked "decimal comma" means comma.
  if (!('decimal' in given) && typeof given.decimalComma === 'boolean') input.decimal = given.decimalComma ? 'comma' : 'auto';
  try {
    return validateSettings(input);
  } catch {
    return null;
  }
}

/** The engine's options for these settings (the only place settings become ScoreOptions). */
export function engineOptions(s: Settings): Required<ScoreOptions> {
  return {
    method: s.method,
    cutoff: s.cutoff,
    direction: s.direction,
    logScale: s.logScale,
    minGroupSize: s.minGroupSize,
    smallGroups: s.smallGroups,
    widen: s.widen,
    decimal: s.decimal,
    decimalComma: s.decimal === 'comma',
  };
}
