// What a stored file is, read from its bytes and never from the name or the type its sender claimed.
// Migration 0010 applies the same rules in SQL to the upload files kept before it.

export const contentTypes = ['text/csv', 'text/plain', 'application/pdf', 'image/png', 'image/jpeg', 'application/octet-stream'] as const;
export type ContentType = (typeof contentTypes)[number];

/** Leading bytes that mark a format ("magic numbers"): ISO 32000-1 §7.5.2, PNG (ISO/IEC 15948) §5.2, JPEG (ITU-T T.81) SOI marker. */
const signatures: readonly [ContentType, Buffer][] = [
  ['application/pdf', Buffer.from('%PDF-', 'latin1')],
  ['image/png', Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])],
  ['image/jpeg', Buffer.from([0xff, 0xd8, 0xff])],
];

/** How far the first line is looked at for a delimiter. */
const FIRST_LINE_BYTES = 64 * 1024;

/**
 * PDF, PNG and JPEG by their leading bytes; any other file with a NUL byte is binary (the lab's exports
 * are UTF-8 or Windows-1252 text, which have none); text whose first line holds a comma, semicolon or tab
 * is CSV, other text plain.
 */
export function detectContentType(bytes: Buffer): ContentType {
  for (const [type, signature] of signatures) if (bytes.subarray(0, signature.length).equals(signature)) return type;
  if (bytes.includes(0)) return 'application/octet-stream';
  const head = bytes.subarray(0, FIRST_LINE_BYTES);
  const lineEnd = head.indexOf(0x0a);
  const firstLine = lineEnd === -1 ? head : head.subarray(0, lineEnd);
  return firstLine.includes(0x2c) || firstLine.includes(0x3b) || firstLine.includes(0x09) ? 'text/csv' : 'text/plain';
}

/**
 * Leading bytes of programs, which are refused whatever their name: Windows PE ("MZ", Microsoft PE/COFF
 * specification), ELF (0x7F "ELF", System V ABI), Mach-O (FEEDFACE / FEEDFACF either byte order, and the
 * fat header CAFEBABE, from Apple's loader.h and fat.h) and scripts ("#!", POSIX exec). From memory of
 * those specifications; tests name them again.
 */
const programSignatures: readonly [string, Buffer][] = [
  ['a Windows program', Buffer.from('MZ', 'latin1')],
  ['a Linux program', Buffer.from([0x7f, 0x45, 0x4c, 0x46])],
  ['a macOS program', Buffer.from([0xfe, 0xed, 0xfa, 0xce])],
  ['a macOS program', Buffer.from([0xfe, 0xed, 0xfa, 0xcf])],
  ['a macOS program', Buffer.from([0xce, 0xfa, 0xed, 0xfe])],
  ['a macOS program', Buffer.from([0xcf, 0xfa, 0xed, 0xfe])],
  ['a macOS program', Buffer.from([0xca, 0xfe, 0xba, 0xbe])],
  ['a script', Buffer.from('#!', 'latin1')],
];

/** Markup a browser would run or draw (HTML, SVG, XML), looked for near the start of a text file. */
const MARKUP = /^\s*<|<\s*(?:!doctype|html|head|body|script|svg|iframe|object|embed|\?xml)\b/i;
const MARKUP_SCAN_BYTES = 4096;

/**
 * Why a file may not be kept as an attachment, in words ("a Windows program", "HTML or XML markup"), or
 * null when nothing speaks against it. Checked before the type (detectContentType), on the bytes only.
 */
export function refusedContent(bytes: Buffer): string | null {
  for (const [what, signature] of programSignatures) if (bytes.subarray(0, signature.length).equals(signature)) return what;
  const type = detectContentType(bytes);
  if (type !== 'text/plain' && type !== 'text/csv') return null;
  // A UTF-8 byte-order mark before the markup changes nothing for a browser.
  const head = bytes.subarray(0, MARKUP_SCAN_BYTES).toString('latin1').replace(/^\xef\xbb\xbf/, '');
  return MARKUP.test(head) ? 'HTML, SVG or XML markup' : null;
}
