import { it } from 'vitest';
import { scoreTable, explainRow, describeCutoff, oneInN, tailProbability, parseCell, cutoffForBudget, countFlaggedAt } from '../../src/scoring/index.js';
it('smoke', () => {
  const cc = ['A','A','A','A','A','A','A','A','A','A','B','B','B', 'C','C','C','C','C','C','C','C','C'];
  const amt: any[] = [10,12,11,13,12,11,10,12,1840,'(5.00)', 100,200,'x', 5,5,5,5,5,5,5,5,6];
  for (const method of ['robust','classic','iqr'] as const) {
    const r = scoreTable({ valueColumns: [{name:'Amount', cells: amt}], groupColumns:[{name:'CC', cells: cc}] }, { method, direction:'both', logScale:false, minGroupSize:8, smallGroups:'pool' });
    const c = r.columns[0];
    console.log(method, Array.from(c.scores).map(x=>x.toFixed(2)).join(' '));
    for (const row of [8, 9, 10, 12, 21, 13]) console.log(explainRow(r, c, row));
    console.log(JSON.stringify(c.groups[2]));
    console.log(cutoffForBudget(c, 1), countFlaggedAt(c, c.cutoff).total, c.flaggedRows);
  }
  console.log(describeCutoff('robust', 3.5, 'both'), describeCutoff('iqr', 1.5, 'high'), oneInN(tailProbability(3.5,'high')));
  for (const s of ['1,234.50','(120.00)','120.00-','EUR 1.234,50',' £1,234 ','#N/A','1,23','$-5','12 GBP','abc','TRUE',''])
    console.log(JSON.stringify(s), JSON.stringify(parseCell(s)), JSON.stringify(parseCell(s, {decimalComma:true})));
});
