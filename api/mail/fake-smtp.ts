// A local SMTP server on loopback that accepts every message and keeps it in memory, for npm start
// and the tests; production points SMTP_URL at a real relay instead.
import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export interface CapturedMessage extends ReadMessage {
  id: number;
  receivedAt: string;
  /** The SMTP envelope: who the message was actually delivered to. */
  envelopeFrom: string;
  recipients: string[];
}

export interface FakeSmtp {
  url: string;
  messages(): CapturedMessage[];
  close(): Promise<void>;
}

/** What a message says, as read by mailparser (headers, RFC 2047 words, MIME parts and encodings). */
export interface ReadMessage {
  /** Bare addresses, without display names. */
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
}

const addresses = (field: AddressObject | AddressObject[] | undefined) =>
  (Array.isArray(field) ? field : field ? [field] : []).flatMap((a) => a.value.map((v) => v.address ?? '')).filter(Boolean);

/** Reads a raw message; bodies come in local form (LF line ends) without the final line end. */
export async function readMessage(raw: Buffer | string): Promise<ReadMessage> {
  const m = await simpleParser(raw, { skipHtmlToText: true, skipTextToHtml: true, skipTextLinks: true, skipImageLinks: true });
  const body = (s: string | false | undefined) => (s || '').replace(/\r\n/g, '\n').replace(/\n$/, '');
  return { from: addresses(m.from)[0] ?? '', to: addresses(m.to), subject: m.subject ?? '', text: body(m.text), html: body(m.html) };
}

/** Messages kept; older ones are dropped so that a long demo session cannot fill the memory. */
const KEEP = 1000;

export async function startFakeSmtp(): Promise<FakeSmtp> {
  const messages: CapturedMessage[] = [];
  let next = 1;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    banner: 'Prismline local test mail server',
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', async () => {
        const read = await readMessage(Buffer.concat(chunks)).catch((): ReadMessage => ({ from: '', to: [], subject: '', text: '', html: '' }));
        messages.push({
          id: next++,
          receivedAt: new Date().toISOString(),
          envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          recipients: session.envelope.rcptTo.map((r) => r.address),
          ...read,
        });
        if (messages.length > KEEP) messages.splice(0, messages.length - KEEP);
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve());
  });
  server.on('error', () => undefined);
  const { port } = server.server.address() as AddressInfo;
  return {
    url: `smtp://127.0.0.1:${port}`,
    messages: () => [...messages],
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
