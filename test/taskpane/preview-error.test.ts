/** Issue 7: a preview that fails says why (it used to become an empty preview silently). */
import { describe, expect, it } from 'vitest';
import { previewOf } from '../../src/taskpane/engine.js';
import { validateSettings } from '../../src/pipeline/settings.js';

describe('previewOf', () => {
  const data = { valueColumns: [{ name: 'Amount', cells: [1, 2, 3, 4, 100] }], groupColumns: [] };
  const settings = validateSettings({ valueColumns: ['Amount'], minGroupSize: 2 });

  it('gives the result when the settings are valid', () => {
    const p = previewOf(data, settings);
    expect(p.error).toBeNull();
    expect(p.result?.columns[0].flaggedRows).toBe(1);
  });

  it('gives the message when they are not, instead of nothing', () => {
    const p = previewOf(data, { ...settings, cutoff: 0 });
    expect(p.result).toBeNull();
    expect(p.error).toMatch(/cutoff must be a number above 0/);
  });
});
