// Reads the MIME messages the fake SMTP server receives (what nodemailer writes): headers with
// RFC 2047 encoded words, multipart bodies, base64 and quoted-printable parts (RFC 2045).

export interface ParsedMessage {
  headers: Map<string, string>;
  subject: string;
  from: string;
  to: string[];
  text: string;
  html: string;
}

function splitHead(raw: string): { head: string; body: string } {
  const at = raw.search(/\r?\n\r?\n/);
  if (at < 0) return { head: raw, body: '' };
  const sep = raw.slice(at).match(/^\r?\n\r?\n/)![0];
  return { head: raw.slice(0, at), body: raw.slice(at + sep.length) };
}

function readHeaders(head: string): Map<string, string> {
  const headers = new Map<string, string>();
  const unfolded = head.replace(/\r?\n[ \t]+/g, ' ');
  for (const line of unfolded.split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon <= 0) continue;
    const name = line.slice(0, colon).trim().toLowerCase();
    if (!headers.has(name)) headers.set(name, line.slice(colon + 1).trim());
  }
  return headers;
}

function qpBytes(text: string, underscoreIsSpace: boolean): Buffer {
  const bytes: number[] = [];
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '=' && /^[0-9A-Fa-f]{2}$/.test(text.slice(i + 1, i + 3))) {
      bytes.push(parseInt(text.slice(i + 1, i + 3), 16));
      i += 2;
    } else if (ch === '_' && underscoreIsSpace) bytes.push(0x20);
    else bytes.push(...Buffer.from(ch, 'utf8'));
  }
  return Buffer.from(bytes);
}

/** RFC 2047 encoded words, UTF-8 (what nodemailer writes). */
export function decodeWords(value: string): string {
  return value
    .replace(/(=\?[^?]+\?[BbQq]\?[^?]*\?=)\s+(?==\?[^?]+\?[BbQq]\?[^?]*\?=)/g, '$1')
    .replace(/=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g, (_m, _charset: string, enc: string, text: string) =>
      (enc.toUpperCase() === 'B' ? Buffer.from(text, 'base64') : qpBytes(text, true)).toString('utf8'),
    );
}

/** The body in local form: MIME's canonical CRLF line ends become LF. */
function decodeBody(body: string, encoding: string | undefined): string {
  const enc = (encoding ?? '7bit').toLowerCase();
  const text =
    enc === 'base64' ? Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('utf8') : enc === 'quoted-printable' ? qpBytes(body.replace(/=\r?\n/g, ''), false).toString('utf8') : body;
  return text.replace(/\r\n/g, '\n');
}

function param(header: string | undefined, name: string): string | null {
  if (!header) return null;
  const m = header.match(new RegExp(`${name}\\s*=\\s*(?:"([^"]*)"|([^;\\s]+))`, 'i'));
  return m ? (m[1] ?? m[2]) : null;
}

function collect(raw: string, into: { text: string; html: string }): Map<string, string> {
  const { head, body } = splitHead(raw);
  const headers = readHeaders(head);
  const type = (headers.get('content-type') ?? 'text/plain').toLowerCase();
  if (type.startsWith('multipart/')) {
    const boundary = param(headers.get('content-type'), 'boundary');
    if (boundary) {
      const parts = body.split(new RegExp(`\\r?\\n?--${boundary.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}(?:--)?[ \\t]*\\r?\\n?`));
      for (const part of parts.slice(1)) if (part.trim()) collect(part, into);
    }
  } else if (type.startsWith('text/html')) {
    into.html ||= decodeBody(body, headers.get('content-transfer-encoding')).replace(/\r?\n$/, '');
  } else if (type.startsWith('text/plain')) {
    into.text ||= decodeBody(body, headers.get('content-transfer-encoding')).replace(/\r?\n$/, '');
  }
  return headers;
}

const addresses = (value: string | undefined) =>
  (value ?? '')
    .split(',')
    .map((a) => decodeWords(a).trim())
    .filter(Boolean)
    .map((a) => a.match(/<([^>]+)>/)?.[1] ?? a);

export function parseMessage(raw: string): ParsedMessage {
  const into = { text: '', html: '' };
  const headers = collect(raw, into);
  return {
    headers,
    subject: decodeWords(headers.get('subject') ?? ''),
    from: addresses(headers.get('from'))[0] ?? '',
    to: addresses(headers.get('to')),
    text: into.text,
    html: into.html,
  };
}
