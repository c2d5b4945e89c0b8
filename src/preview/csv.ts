/**
 * A small CSV reader for the preview page (RFC 4180: quoted fields, doubled quotes, CRLF/LF, a
 * byte-order mark). The delimiter is detected from the first line (comma, semicolon or tab).
 * Plain numbers ("120", "-45.5") become numbers, as a spreadsheet does on opening a CSV; anything
 * else ("1,234.50", "(120.00)", dates) stays text, for the parse step to judge and explain.
 * Cost O(characters).
 */
export function detectDelimiter(text: string): string {
  const firstLine = text.slice(0, text.search(/\r?\n|$/));
  const count = (d: string) => firstLine.split(d).length - 1;
  const candidates = [',', ';', '\t'];
  let best = ',';
  for (const d of candidates) if (count(d) > count(best)) best = d;
  return best;
}

const PLAIN_NUMBER = /^-?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$/;

export function parseCsv(input: string, delimiter?: string): (string | number | null)[][] {
  const text = input.charCodeAt(0) === 0xfeff ? input.slice(1) : input;
  const d = delimiter ?? detectDelimiter(text);
  const rows: (string | number | null)[][] = [];
  let row: (string | number | null)[] = [];
  let field = '';
  let quoted = false;
  let wasQuoted = false;
  const push = () => {
    const t = wasQuoted ? field : field.trim();
    row.push(t === '' ? null : !wasQuoted && PLAIN_NUMBER.test(t) ? Number(t) : field);
    field = '';
    wasQuoted = false;
  };
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"') {
        if (text[i + 1] === '"') {
          field += '"';
          i++;
        } else quoted = false;
      } else field += ch;
      continue;
    }
    if (ch === '"' && field.trim() === '') {
      quoted = true;
      wasQuoted = true;
      field = '';
    } else if (ch === d) push();
    else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[i + 1] === '\n') i++;
      push();
      rows.push(row);
      row = [];
    } else field += ch;
  }
  if (field !== '' || row.length > 0 || wasQuoted) {
    push();
    rows.push(row);
  }
  return rows;
}
