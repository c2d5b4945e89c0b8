import { it } from 'vitest';
import { benchWorkbook } from '../../bench/workbook.js';
it('full', async () => { console.log(JSON.stringify(await benchWorkbook(Number(process.env.ROWS ?? 100000)))); }, 600000);
