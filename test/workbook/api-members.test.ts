import { describe, expect, it } from 'vitest';
import { EXCEL_MEMBERS, REQUIRED_EXCEL_API } from '../../src/workbook/api-members.js';
import { findUsedMembers } from './excel-members.js';

describe('Excel API members used by src/workbook', () => {
  const used = findUsedMembers();
  const listed = new Map(EXCEL_MEMBERS.map((m) => [m.member, m.apiSet]));

  it('finds the members (the scanner works)', () => {
    expect(used.map((u) => u.member)).toEqual(expect.arrayContaining(['Worksheet.getRangeByIndexes', 'Range.values', 'Range.getTables']));
  });

  it('lists every member used, with the requirement set the typings state', () => {
    const missing = used.filter((u) => !listed.has(u.member)).map((u) => `${u.member} (${u.apiSet}) in ${u.files.join(', ')}`);
    expect(missing).toEqual([]);
    const wrong = used.filter((u) => listed.has(u.member) && listed.get(u.member) !== u.apiSet).map((u) => `${u.member}: listed ${listed.get(u.member)}, typings ${u.apiSet}`);
    expect(wrong).toEqual([]);
  });

  it('lists nothing that is not used', () => {
    const names = new Set(used.map((u) => u.member));
    expect(EXCEL_MEMBERS.filter((m) => !names.has(m.member)).map((m) => m.member)).toEqual([]);
  });

  it('requires the highest ExcelApi set used (Range.getTables is ExcelApi 1.9 per the typings)', () => {
    expect(REQUIRED_EXCEL_API).toBe('1.9');
  });
});
