// What an NCR's attachments may be: photos (PNG, JPEG), PDFs and the instruments' text or CSV files,
// told by their bytes and never by their name; programs, scripts and markup are refused. Names keep
// their letters (any script) but lose folders, control characters and excess length.
import { contentTypes, detectContentType, refusedContent, type ContentType } from '@api/files/content-type';
import { HttpError } from '@api/http/errors';

/** Bytes of one attachment at most. */
export const MAX_ATTACHMENT_BYTES = 10 * 1024 * 1024;
/** Files in one request at most. */
export const MAX_ATTACHMENTS_PER_REQUEST = 5;
/** Characters of a kept file name at most (the extension is kept when the name is cut). */
export const MAX_FILE_NAME_CHARS = 120;

export const attachmentTypes: readonly ContentType[] = contentTypes.filter((t) => t !== 'application/octet-stream');

/** The type an attachment is kept as; 415 with a plain message for anything else. */
export function attachmentType(bytes: Buffer, fileName: string): ContentType {
  const refused = refusedContent(bytes);
  if (refused) throw new HttpError(415, `${fileName} is ${refused}, whatever its name says; attach photos (PNG, JPEG), PDFs or text and CSV files only`);
  const type = detectContentType(bytes);
  if (!attachmentTypes.includes(type)) throw new HttpError(415, `${fileName} is not a photo (PNG, JPEG), a PDF or a text or CSV file; only those can be attached`);
  return type;
}

/**
 * A name safe to keep and to hand back: the last part of any path (either slash), without control or
 * format characters, leading dots or spaces, cut to MAX_FILE_NAME_CHARS keeping the extension.
 */
export function sanitiseFileName(raw: string): string {
  const last = raw.split(/[/\\]/).pop() ?? '';
  let name = last
    .normalize('NFC')
    .replace(/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/gu, '')
    .replace(/[<>:"|?*]/g, '_')
    .replace(/\s+/g, ' ')
    .trim()
    .replace(/^[.\s]+/, '');
  const chars = [...name];
  if (chars.length > MAX_FILE_NAME_CHARS) {
    const dot = name.lastIndexOf('.');
    const ext = dot > 0 && name.length - dot <= 10 ? name.slice(dot) : '';
    name = [...name.slice(0, name.length - ext.length)].slice(0, MAX_FILE_NAME_CHARS - [...ext].length).join('') + ext;
  }
  return name || 'attachment';
}
