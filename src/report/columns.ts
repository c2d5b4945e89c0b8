/**
 * Spreadsheet column letters, the one conversion every layer above scoring uses (the sandbox, which
 * imports nothing of ours, keeps its own in src/sandbox/address.ts). 0-based indices; "A" = 0, "XFD" = 16383.
 */

/** 0-based column index -> letters ("A", "Z", "AA", "XFD"). */
export function columnLetters(index: number): string {
  let s = '';
  let n = index + 1;
  while (n > 0) {
    const m = (n - 1) % 26;
    s = String.fromCharCode(65 + m) + s;
    n = Math.floor((n - 1) / 26);
  }
  return s;
}

/** Letters -> 0-based column index, or -1 when not one to three letters. */
export function columnFromLetters(letters: string): number {
  if (!/^[A-Za-z]{1,3}$/.test(letters)) return -1;
  let n = 0;
  for (const ch of letters.toUpperCase()) n = n * 26 + (ch.charCodeAt(0) - 64);
  return n - 1;
}
