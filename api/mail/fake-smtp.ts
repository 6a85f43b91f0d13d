// A local SMTP server on loopback that accepts every message and keeps it in memory, for npm start
// and the tests; production points SMTP_URL at a real relay instead.
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import { parseMessage } from './mime';

export interface CapturedMessage {
  id: number;
  receivedAt: string;
  /** The SMTP envelope: who the message was actually delivered to. */
  envelopeFrom: string;
  recipients: string[];
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
}

export interface FakeSmtp {
  url: string;
  messages(): CapturedMessage[];
  close(): Promise<void>;
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
      stream.on('end', () => {
        const parsed = parseMessage(Buffer.concat(chunks).toString('utf8'));
        messages.push({
          id: next++,
          receivedAt: new Date().toISOString(),
          envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          recipients: session.envelope.rcptTo.map((r) => r.address),
          from: parsed.from,
          to: parsed.to,
          subject: parsed.subject,
          text: parsed.text,
          html: parsed.html,
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
