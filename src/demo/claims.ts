/**
 * The demo scenario: one quarter of expense claims at an invented company, Oskavel Instruments.
 * Every name, code and amount here is made up; any likeness to a real firm or person is chance.
 *
 * Pure and browser-safe: a seeded PRNG (mulberry32) makes the output identical on every run, so the
 * demo, the tests and the preview page all see the same claims. Imports only scoring types.
 *
 * What the scenario contains, on purpose (each is something real claim sheets do):
 * - five cost centres x five categories, skewed (lognormal) amounts in each;
 * - text numbers ("1,234.50"), accounting-style credits ("(120.00)"), blanks, error cells
 *   (#N/A, #VALUE!) and a text cell ("see receipt") in the Amount column;
 * - a group of exactly three claims (CC-560 / Training);
 * - a fixed-allowance group where most amounts are identical, so its MAD is 0 (CC-240 / Phone allowance);
 * - a group where three large claims mask each other under classic z but stand out under robust z
 *   (CC-315 / Lodging);
 * - notes that begin with "=" or "+", which every sink must write as text.
 */
import type { CellError, RawCell } from '../scoring/types.js';
import { mulberry32 } from './random.js';

export const DEMO_COMPANY = 'Oskavel Instruments (an invented company)';
export const DEMO_SHEET = 'Claims';
export const DEMO_HEADERS = ['Claim ID', 'Employee', 'Cost centre', 'Category', 'Claim date', 'Amount', 'Notes'] as const;

/** The planted groups, so tests and docs can point at them. */
export const DEMO_GROUPS = {
  trio: { costCentre: 'CC-560', category: 'Training' },
  allowance: { costCentre: 'CC-240', category: 'Phone allowance' },
  masking: { costCentre: 'CC-315', category: 'Lodging' },
} as const;

export interface DemoOptions {
  /** Number of data rows (default 600, at least DEMO_MIN_ROWS). */
  readonly rows?: number;
  /** PRNG seed (default 20250331). */
  readonly seed?: number;
}

export interface DemoTable {
  readonly headers: string[];
  /** Row-major, header excluded. */
  readonly rows: RawCell[][];
}

const COST_CENTRES = ['CC-110', 'CC-240', 'CC-315', 'CC-420', 'CC-560'] as const;
/** Category, median amount, log-scale spread (sigma). Invented figures. */
const CATEGORIES: readonly (readonly [string, number, number])[] = [
  ['Travel', 185, 0.55],
  ['Lodging', 140, 0.35],
  ['Meals', 38, 0.45],
  ['Mileage', 52, 0.4],
  ['Supplies', 64, 0.7],
];

/** Masking group: twenty ordinary hotel nights and three large claims (hand-set, invented). */
const MASKING_AMOUNTS = [
  118.4, 124.9, 129.0, 131.75, 133.2, 135.0, 136.6, 138.1, 139.9, 141.25,
  142.8, 144.0, 146.35, 148.9, 151.1, 153.6, 156.0, 159.45, 162.3, 168.7,
  1485.0, 1520.4, 1610.0,
];
/** Allowance group: twelve identical amounts and two that differ. */
const ALLOWANCE_AMOUNTS = [45, 45, 45, 45, 45, 45, 45, 45, 45, 45, 45, 45, 60, 38.5];
/** Group of three. */
const TRIO_AMOUNTS = [420, 395, 1180];

const SPECIAL_ROWS = MASKING_AMOUNTS.length + ALLOWANCE_AMOUNTS.length + TRIO_AMOUNTS.length;
/** Smallest `rows` accepted: the planted groups plus room for the messy cells. */
export const DEMO_MIN_ROWS = SPECIAL_ROWS + 60;

const FIRST_A = ['Ma', 'Te', 'Ori', 'Sa', 'Qui', 'Ve', 'Lu', 'Ny', 'Za', 'Ele'];
const FIRST_B = ['rel', 'vin', 'sha', 'dor', 'lia', 'ket'];
const LAST_A = ['Quor', 'Vask', 'Thrim', 'Pell', 'Ozz', 'Brann', 'Yelt', 'Dov'];
const LAST_B = ['ley', 'ov', 'ard', 'enby', 'ith', 'ask'];

const NOTE_TEXT = ['Client visit', 'Team offsite', 'Trade fair', 'Site survey', 'Supplier audit', 'Training day'];


function normal(rand: () => number): number {
  // Box-Muller; 1 - u keeps the log argument in (0, 1].
  const u = 1 - rand();
  const v = rand();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

function round2(x: number): number {
  return Math.round(x * 100) / 100;
}

/** "1234.5" -> "1,234.50" (fixed format, independent of the machine's locale). */
export function formatThousands(x: number): string {
  const [int, frac] = Math.abs(x).toFixed(2).split('.');
  const grouped = int.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return `${x < 0 ? '-' : ''}${grouped}.${frac}`;
}

function err(code: string): CellError {
  return { kind: 'error', code };
}

interface DraftRow {
  employee: string;
  costCentre: string;
  category: string;
  day: number;
  amount: RawCell;
  note: RawCell;
}

/** Deterministic invented claims; same options give the same table. */
export function demoClaims(options: DemoOptions = {}): DemoTable {
  const total = options.rows ?? 600;
  if (!Number.isInteger(total) || total < DEMO_MIN_ROWS) {
    throw new RangeError(`demoClaims: rows must be a whole number of at least ${DEMO_MIN_ROWS}, got ${total}`);
  }
  const rand = mulberry32(options.seed ?? 20250331);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rand() * xs.length)];

  // Employees with a home cost centre.
  const employees: { name: string; cc: string }[] = [];
  for (let i = 0; i < 45; i++) {
    const name = `${FIRST_A[i % FIRST_A.length]}${FIRST_B[(i * 7) % FIRST_B.length]} ${LAST_A[(i * 3) % LAST_A.length]}${LAST_B[(i * 5 + Math.floor(i / 6)) % LAST_B.length]}`;
    employees.push({ name, cc: COST_CENTRES[i % COST_CENTRES.length] });
  }
  const staffOf = (cc: string) => employees.filter((e) => e.cc === cc);
  const day = () => Math.floor(rand() * 90); // 1 Jan .. 31 Mar 2025

  const drafts: DraftRow[] = [];
  const special = (cc: string, category: string, amounts: readonly number[], note: (i: number) => RawCell) => {
    const staff = staffOf(cc);
    amounts.forEach((amount, i) => {
      drafts.push({ employee: pick(staff).name, costCentre: cc, category, day: day(), amount, note: note(i) });
    });
  };
  special(DEMO_GROUPS.masking.costCentre, DEMO_GROUPS.masking.category, MASKING_AMOUNTS, (i) =>
    i >= 20 ? 'Conference hotel' : null,
  );
  special(DEMO_GROUPS.allowance.costCentre, DEMO_GROUPS.allowance.category, ALLOWANCE_AMOUNTS, () => 'Monthly allowance');
  special(DEMO_GROUPS.trio.costCentre, DEMO_GROUPS.trio.category, TRIO_AMOUNTS, () => 'Course fee');

  // Ordinary groups: every cost centre x category except the planted masking pair.
  const pairs: [string, string, number, number][] = [];
  for (const cc of COST_CENTRES) {
    for (const [cat, median, sigma] of CATEGORIES) {
      if (cc === DEMO_GROUPS.masking.costCentre && cat === DEMO_GROUPS.masking.category) continue;
      pairs.push([cc, cat, median, sigma]);
    }
  }
  const ordinaryStart = drafts.length;
  const ordinary = total - SPECIAL_ROWS;
  for (let i = 0; i < ordinary; i++) {
    // The first pairs.length rows give every pair at least one claim; the rest land at random.
    const [cc, cat, median, sigma] = i < pairs.length ? pairs[i] : pick(pairs);
    let amount = round2(median * Math.exp(sigma * normal(rand)));
    if (rand() < 0.01) amount = round2(amount * (5 + rand() * 4)); // the odd very large claim
    const note = rand() < 0.12 ? pick(NOTE_TEXT) : null;
    drafts.push({ employee: pick(staffOf(cc)).name, costCentre: cc, category: cat, day: day(), amount, note });
  }

  // Messy cells, at fixed positions among the ordinary rows (never in the planted groups).
  const slot = (k: number) => drafts[ordinaryStart + pairs.length + ((k * 37) % (ordinary - pairs.length))];
  let k = 0;
  const textNumbers = [1234.5, 2310.0];
  for (const x of textNumbers) {
    const d = slot(k++);
    d.category = 'Travel';
    d.amount = formatThousands(x);
  }
  for (let i = 0; i < 4; i++) {
    const d = slot(k++);
    d.amount = formatThousands(typeof d.amount === 'number' ? d.amount : 50);
  }
  for (const credit of [120, 64.5, 38.2, 210, 15.75]) {
    const d = slot(k++);
    d.amount = `(${formatThousands(credit)})`;
    d.note = 'Refund of duplicate claim';
  }
  for (let i = 0; i < 4; i++) {
    const d = slot(k++);
    d.amount = null;
    d.note = 'Amount missing';
  }
  slot(k++).amount = err('#N/A');
  slot(k++).amount = err('#VALUE!');
  {
    const d = slot(k++);
    d.amount = 'see receipt';
  }
  slot(k++).note = '+1 guest at dinner';
  slot(k++).note = '=as agreed with manager';
  slot(k++).note = '@front desk receipt';

  // Order by date, then number the claims.
  const order = drafts.map((d, i) => ({ d, i, tie: rand() }));
  order.sort((a, b) => a.d.day - b.d.day || a.tie - b.tie);
  const rows: RawCell[][] = order.map(({ d }, n) => [
    `OSK-${String(10001 + n).padStart(5, '0')}`,
    d.employee,
    d.costCentre,
    d.category,
    new Date(Date.UTC(2025, 0, 1 + d.day)),
    d.amount,
    d.note,
  ]);
  return { headers: [...DEMO_HEADERS], rows };
}
