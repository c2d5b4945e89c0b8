/**
 * A cheap, chunking-independent fingerprint of cell values (32-bit FNV-1a over each cell's type and
 * text, row-major). Used to notice that the user typed into the data while a run was scoring it.
 * O(cells). Not cryptographic; a collision would need a change that hashes identically.
 */
export class Fingerprint {
  private h = 0x811c9dc5;
  cells = 0;

  addRows(values: readonly (readonly unknown[])[]): void {
    let h = this.h;
    for (const row of values) {
      for (const v of row) {
        const s = v === null || v === undefined || v === '' ? '\u0000' : `${typeof v}:${String(v)}`;
        for (let i = 0; i < s.length; i++) {
          h ^= s.charCodeAt(i);
          h = Math.imul(h, 0x01000193);
        }
        h ^= 0x1f;
        h = Math.imul(h, 0x01000193);
        this.cells++;
      }
    }
    this.h = h >>> 0;
  }

  get value(): string {
    return `${this.h.toString(16)}:${this.cells}`;
  }
}
