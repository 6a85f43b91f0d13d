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
