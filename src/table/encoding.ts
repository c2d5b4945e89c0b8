/**
 * Which text encoding a delimited file uses, from its bytes (pure; TextDecoder is in browsers and
 * Node alike). In order: a byte-order mark (UTF-8 EF BB BF, UTF-16 LE FF FE, UTF-16 BE FE FF);
 * UTF-16 without a mark when most of the first bytes' odd (LE) or even (BE) positions are zero (ASCII
 * text in UTF-16); UTF-8 when the bytes are valid UTF-8; otherwise Windows-1252, the encoding
 * spreadsheet programs on Windows write "CSV" in (the WHATWG Encoding Standard maps the label
 * "latin1" / "iso-8859-1" to it too). Cost O(n) for the UTF-8 check.
 */

export const ENCODINGS = ['utf-8', 'utf-16le', 'utf-16be', 'windows-1252'] as const;
export type TextEncodingName = (typeof ENCODINGS)[number];

/** Words for the notes and messages. */
export const ENCODING_WORDS: Record<TextEncodingName, string> = {
  'utf-8': 'UTF-8',
  'utf-16le': 'UTF-16 LE',
  'utf-16be': 'UTF-16 BE',
  'windows-1252': 'Windows-1252',
};

const ALIASES: Record<string, TextEncodingName> = {
  'utf-8': 'utf-8', utf8: 'utf-8',
  'utf-16le': 'utf-16le', utf16le: 'utf-16le', 'utf-16': 'utf-16le', utf16: 'utf-16le', unicode: 'utf-16le',
  'utf-16be': 'utf-16be', utf16be: 'utf-16be',
  'windows-1252': 'windows-1252', cp1252: 'windows-1252', 'latin-1': 'windows-1252', latin1: 'windows-1252',
  'iso-8859-1': 'windows-1252', ansi: 'windows-1252',
};

/** The encoding a user named (`--encoding`), or null when we do not know the name. */
export function encodingFromName(name: string): TextEncodingName | null {
  return ALIASES[name.trim().toLowerCase()] ?? null;
}

export interface DetectedEncoding {
  readonly encoding: TextEncodingName;
  /** Bytes of byte-order mark to skip. */
  readonly bomBytes: number;
  /** How it was decided, for the notes: "byte-order mark", "given", "valid UTF-8", ... */
  readonly how: 'byte-order mark' | 'given' | 'zero bytes (UTF-16 without a byte-order mark)' | 'valid UTF-8' | 'not valid UTF-8';
}

/** Encoding from a byte-order mark or the zero-byte pattern of the first bytes; null when they do not say. */
export function encodingFromStart(head: Uint8Array): DetectedEncoding | null {
  if (head.length >= 3 && head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf) return { encoding: 'utf-8', bomBytes: 3, how: 'byte-order mark' };
  if (head.length >= 2 && head[0] === 0xff && head[1] === 0xfe) return { encoding: 'utf-16le', bomBytes: 2, how: 'byte-order mark' };
  if (head.length >= 2 && head[0] === 0xfe && head[1] === 0xff) return { encoding: 'utf-16be', bomBytes: 2, how: 'byte-order mark' };
  const n = Math.min(head.length, 4096) & ~1;
  if (n >= 4) {
    let evenZero = 0;
    let oddZero = 0;
    for (let i = 0; i < n; i += 2) {
      if (head[i] === 0) evenZero++;
      if (head[i + 1] === 0) oddZero++;
    }
    const pairs = n / 2;
    const how = 'zero bytes (UTF-16 without a byte-order mark)';
    if (oddZero > pairs * 0.6 && evenZero < pairs * 0.1) return { encoding: 'utf-16le', bomBytes: 0, how };
    if (evenZero > pairs * 0.6 && oddZero < pairs * 0.1) return { encoding: 'utf-16be', bomBytes: 0, how };
  }
  return null;
}

/** Whole-buffer detection: mark, zero bytes, then valid UTF-8 or Windows-1252. `given` wins (a mark is still skipped). */
export function detectEncoding(bytes: Uint8Array, given?: TextEncodingName): DetectedEncoding {
  const start = encodingFromStart(bytes);
  if (given !== undefined) return { encoding: given, bomBytes: start && start.encoding === given ? start.bomBytes : 0, how: 'given' };
  if (start) return start;
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    return { encoding: 'utf-8', bomBytes: 0, how: 'valid UTF-8' };
  } catch {
    return { encoding: 'windows-1252', bomBytes: 0, how: 'not valid UTF-8' };
  }
}

/**
 * Windows-1252 bytes 0x80-0x9F as the WHATWG Encoding Standard's index-windows-1252 maps them (written
 * from memory of that index). Node 20's TextDecoder decodes the label "windows-1252" as ISO-8859-1,
 * which leaves these as C1 control characters (0x80 would not be the euro sign), so we map them here.
 */
const CP1252_HIGH = [
  0x20ac, 0x81, 0x201a, 0x192, 0x201e, 0x2026, 0x2020, 0x2021, 0x2c6, 0x2030, 0x160, 0x2039, 0x152, 0x8d, 0x17d, 0x8f,
  0x90, 0x2018, 0x2019, 0x201c, 0x201d, 0x2022, 0x2013, 0x2014, 0x2dc, 0x2122, 0x161, 0x203a, 0x153, 0x9d, 0x17e, 0x178,
];

/** Text decoded with Windows-1252's label, with 0x80-0x9F mapped as Windows-1252 does (see CP1252_HIGH). */
export function fixWindows1252(text: string): string {
  return /[\u0080-\u009f]/.test(text) ? text.replace(/[\u0080-\u009f]/g, (c) => String.fromCharCode(CP1252_HIGH[c.charCodeAt(0) - 0x80])) : text;
}

/** A TextDecoder for one of our encodings (Windows-1252 corrected as said at CP1252_HIGH). */
export function textDecoder(encoding: TextEncodingName, fatal = false): { decode(bytes: Uint8Array, options?: { stream?: boolean }): string } {
  const d = new TextDecoder(encoding, { fatal });
  if (encoding !== 'windows-1252') return d;
  return { decode: (bytes, options) => fixWindows1252(d.decode(bytes, options)) };
}

/** Decode a whole buffer as detected (or given). */
export function decodeText(bytes: Uint8Array, given?: TextEncodingName): { text: string; encoding: DetectedEncoding } {
  const encoding = detectEncoding(bytes, given);
  const text = textDecoder(encoding.encoding).decode(bytes.subarray(encoding.bomBytes));
  return { text, encoding };
}

/** "read as Windows-1252 (not valid UTF-8)" */
export function describeEncoding(e: DetectedEncoding): string {
  return `text encoding ${ENCODING_WORDS[e.encoding]} (${e.how === 'given' ? 'as given' : e.how})`;
}
