/**
 * What a file really is, from its first bytes (pure), so a file we cannot read gets a message that
 * says what it is and how to convert it, and a file whose extension lies is read as what it is or
 * refused clearly. Signatures: zip "PK\x03\x04" (xlsx, xlsb, ods: told apart by the names inside);
 * OLE2 compound file D0 CF 11 E0 A1 B1 1A E1 (.xls, or an encrypted Office file: its streams are
 * named "EncryptionInfo" / "EncryptedPackage", stored as UTF-16LE in the directory); HTML tables
 * saved with a spreadsheet extension; otherwise text.
 */

export type FileKind = 'xlsx' | 'xlsb' | 'ods' | 'xls' | 'encrypted' | 'zip' | 'html' | 'text' | 'binary';

function utf16(s: string): Uint8Array {
  const out = new Uint8Array(s.length * 2);
  for (let i = 0; i < s.length; i++) out[2 * i] = s.charCodeAt(i);
  return out;
}

function includes(hay: Uint8Array, needle: Uint8Array): boolean {
  outer: for (let i = 0; i + needle.length <= hay.length; i++) {
    for (let j = 0; j < needle.length; j++) if (hay[i + j] !== needle[j]) continue outer;
    return true;
  }
  return false;
}

const ascii = (s: string): Uint8Array => Uint8Array.from(s, (c) => c.charCodeAt(0));

/**
 * Kind from the first bytes of a file (64 KiB is plenty; zip entry names are looked for in what is
 * given, so pass the central directory too when it is at hand: `tail`).
 */
export function sniffKind(head: Uint8Array, tail: Uint8Array = new Uint8Array(0)): FileKind {
  if (head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x03 && head[3] === 0x04) {
    if (includes(head.subarray(0, 200), ascii('mimetypeapplication/vnd.oasis.opendocument.spreadsheet'))) return 'ods';
    const names = (s: string) => includes(head, ascii(s)) || includes(tail, ascii(s));
    if (names('xl/workbook.bin')) return 'xlsb';
    if (names('xl/workbook.xml') || names('xl/worksheets/')) return 'xlsx';
    if (names('content.xml') && names('mimetype')) return 'ods';
    return 'zip';
  }
  const ole = [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1];
  if (head.length >= 8 && ole.every((b, i) => head[i] === b)) {
    return includes(head, utf16('EncryptedPackage')) || includes(head, utf16('EncryptionInfo')) ? 'encrypted' : 'xls';
  }
  const start = new TextDecoder('latin1').decode(head.subarray(0, 512)).replace(/^\uFEFF|^[\u00ef\u00bb\u00bf]+/, '').trimStart().toLowerCase();
  if (start.startsWith('<html') || start.startsWith('<!doctype html') || start.startsWith('<table') || start.startsWith('<?xml') && start.includes('urn:schemas-microsoft-com:office:spreadsheet')) return 'html';
  // Text: no NUL bytes (UTF-16 text has them, but also a byte-order mark or a regular pattern).
  const n = Math.min(head.length, 4096);
  let nul = 0;
  let control = 0;
  for (let i = 0; i < n; i++) {
    const b = head[i];
    if (b === 0) nul++;
    else if (b < 9 || (b > 13 && b < 32)) control++;
  }
  const utf16Bom = n >= 2 && ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff));
  if (utf16Bom || (nul > n * 0.3 && control < n * 0.05)) return 'text';
  if (nul === 0 && control <= n * 0.01) return 'text';
  return 'binary';
}

/** One line that says what the file is and how to make it readable, for kinds we do not read. */
export function unreadableMessage(name: string, kind: FileKind, ext: string): string | null {
  const save = 'open it in a spreadsheet program and save it as an Excel Workbook (.xlsx) or as CSV, then run again';
  switch (kind) {
    case 'xls':
      return `${name} is an Excel 97-2003 workbook (.xls), which Tailmark does not read: ${save}`;
    case 'xlsb':
      return `${name} is an Excel binary workbook (.xlsb), which Tailmark does not read: ${save}`;
    case 'ods':
      return `${name} is an OpenDocument spreadsheet (.ods), which Tailmark does not read: ${save} (LibreOffice can also convert it: soffice --headless --convert-to xlsx ${name})`;
    case 'encrypted':
      return `${name} is protected with a password (encrypted), so its cells cannot be read: open it with the password and save a copy without one (in Excel: File > Info > Protect Workbook > Encrypt with Password, clear the password), then run again on the copy`;
    case 'html':
      return `${name} is a web page (HTML) saved with a spreadsheet extension, not a workbook: ${save}`;
    case 'zip':
      return `${name} is a zip archive but not an Excel workbook${ext ? ` (despite its ${ext} extension)` : ''}: use an .xlsx workbook or a CSV file`;
    case 'binary':
      return `${name} is not a spreadsheet or text file Tailmark can read${ext ? ` (despite its ${ext} extension)` : ''}: use an .xlsx workbook or a CSV file`;
    default:
      return null;
  }
}
