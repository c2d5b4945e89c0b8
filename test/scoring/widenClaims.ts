/**
 * Invented claims for the small-group question (issue 9 item 6): 30 cost centres x 6 categories
 * whose usual amounts differ by a factor of up to 40 (taxi about 25, flights about 420, training
 * about 900). Common categories give every cost centre a group big enough to score on its own;
 * rare ones (hotel, flights, training, conference) give many cost centres only 1-7 claims, too
 * few to score alone. Amounts are lognormal around the category's level (sigma 0.35), a cost
 * centre's level varies a little (sigma 0.1). A few planted claims sit far above their category's
 * level (x 6), in small groups. Seeded: the same every run. Nothing here is real.
 */
import { mulberry32 } from '../../src/demo/random.js';

export interface WidenClaims {
  readonly costCentre: string[];
  readonly category: string[];
  readonly amount: number[];
  /** Row indices of the planted claims. */
  readonly planted: number[];
}

const CATEGORIES: readonly { readonly name: string; readonly level: number; readonly rows: readonly [number, number] }[] = [
  { name: 'Taxi', level: 25, rows: [14, 40] },
  { name: 'Meals', level: 38, rows: [14, 40] },
  { name: 'Hotel', level: 140, rows: [1, 12] },
  { name: 'Flights', level: 420, rows: [1, 7] },
  { name: 'Conference', level: 650, rows: [0, 4] },
  { name: 'Training', level: 900, rows: [0, 4] },
];

export function widenClaims(seed = 20261202): WidenClaims {
  const rnd = mulberry32(seed);
  const normal = (): number => Math.sqrt(-2 * Math.log(1 - rnd())) * Math.cos(2 * Math.PI * rnd());
  const out: WidenClaims = { costCentre: [], category: [], amount: [], planted: [] };
  for (let c = 0; c < 30; c++) {
    const cc = `CC-${String(200 + c)}`;
    const ccLevel = Math.exp(0.1 * normal());
    for (const cat of CATEGORIES) {
      const n = cat.rows[0] + Math.floor(rnd() * (cat.rows[1] - cat.rows[0] + 1));
      for (let i = 0; i < n; i++) {
        out.costCentre.push(cc);
        out.category.push(cat.name);
        out.amount.push(Math.round(cat.level * ccLevel * Math.exp(0.35 * normal()) * 100) / 100);
      }
      // Planted: in every fifth cost centre, one claim 6 x the level of a rare category.
      if (c % 5 === 0 && cat.rows[1] <= 7 && n > 0) {
        out.planted.push(out.amount.length);
        out.costCentre.push(cc);
        out.category.push(cat.name);
        out.amount.push(Math.round(cat.level * 6 * 100) / 100);
      }
    }
  }
  return out;
}
