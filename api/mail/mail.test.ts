import { describe, expect, it } from 'vitest';
import nodemailer, { type SendMailOptions } from 'nodemailer';
import { readMessage, startFakeSmtp } from './fake-smtp';
import { backoffSeconds, createTransport } from './outbox';
import { composeAlarmMail, type AlarmMailFacts } from './compose';

/** What nodemailer (the general-purpose library) writes for a message, without sending it. */
async function build(options: SendMailOptions): Promise<string> {
  const t = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'windows' });
  const info = await t.sendMail(options);
  return (info.message as Buffer).toString('utf8');
}

describe('reading what nodemailer writes', () => {
  it('decodes quoted-printable and base64 bodies, UTF-8 subjects and several recipients', async () => {
    const text = `Lot L1-261130-E1: X̄ = 158,5 mm über der oberen Eingriffsgrenze — ${'long line '.repeat(20)}end`;
    for (const textEncoding of ['quoted-printable', 'base64'] as const) {
      const raw = await build({
        from: 'Prismline <prismline@localhost>',
        to: ['manager@harrowvale.example', 'Lab Lead <lead@harrowvale.example>'],
        subject: 'Prismline alarm: Beyond a control limit — HVL25-FLOW, lot L1-261130-E1 (X̄)',
        text,
        html: '<p>X̄ &amp; R</p>',
        textEncoding,
      });
      const m = await readMessage(raw);
      expect(m.subject).toBe('Prismline alarm: Beyond a control limit — HVL25-FLOW, lot L1-261130-E1 (X̄)');
      expect(m.to).toEqual(['manager@harrowvale.example', 'lead@harrowvale.example']);
      expect(m.from).toBe('prismline@localhost');
      expect(m.text).toBe(text);
      expect(m.html).toBe('<p>X̄ &amp; R</p>');
    }
  });

  it('decodes RFC 2047 encoded words of both kinds and joins adjacent ones (RFC 2047 section 6.2)', async () => {
    const withSubject = (subject: string) => readMessage(`From: prismline@localhost\r\nSubject: ${subject}\r\n\r\nBody\r\n`);
    expect((await withSubject('=?UTF-8?B?WMyE?= =?UTF-8?Q?_chart?=')).subject).toBe('X̄ chart');
    expect((await withSubject('plain text')).subject).toBe('plain text');
  });

  it('reads a display name with a comma as one recipient (RFC 5322 quoted string)', async () => {
    const raw = await build({ from: 'prismline@localhost', to: ['"Lead, Lab" <lead@harrowvale.example>', 'manager@harrowvale.example'], subject: 'x', text: 'x' });
    expect((await readMessage(raw)).to).toEqual(['lead@harrowvale.example', 'manager@harrowvale.example']);
  });
});

describe('the local fake SMTP server', () => {
  it('accepts a message sent by nodemailer over SMTP and keeps envelope, subject and text', async () => {
    const fake = await startFakeSmtp();
    try {
      const transport = createTransport(fake.url);
      await transport.sendMail({ from: 'prismline@localhost', to: 'auditor@harrowvale.example', subject: 'Morning digest', text: 'Two new alarms.\nSee the chart.', html: '<p>Two new alarms.</p>' });
      transport.close();
      const [m] = fake.messages();
      expect(m).toMatchObject({ envelopeFrom: 'prismline@localhost', recipients: ['auditor@harrowvale.example'], subject: 'Morning digest', text: 'Two new alarms.\nSee the chart.', html: '<p>Two new alarms.</p>' });
      expect(fake.url).toMatch(/^smtp:\/\/127\.0\.0\.1:\d+$/);
    } finally {
      await fake.close();
    }
  });
});

describe('alarm messages', () => {
  const facts: AlarmMailFacts = {
    alarmId: 7,
    rule: 'out-of-spec',
    characteristicId: 12,
    characteristicCode: 'HVL25-RC28',
    characteristicName: 'Compressive strength 28 d',
    unit: 'MPa',
    decimals: 1,
    productCode: 'HVL25',
    productName: 'HV Level 25',
    lineCode: 'L1',
    lotNumber: 'L1-261102-E1',
    producedAt: new Date('2026-11-02T06:30:00Z'),
    shift: 'early',
    pointIndex: 140,
    statistic: 24.15,
    values: [24.1, 24.3, 23.9, 24.2, 24.4, 24.0],
    limitName: 'LSL',
    limitValue: 25,
    description: 'Lot L1-261102-E1 (produced 2026-11-02 06:30 UTC): the result 24.15 MPa is below the lower specification limit 25 MPa <C25> (specification revision 1).',
    lateReason: 'Late result: lot L1-261102-E1 was tested after later lots were charted.',
  };

  it('say what happened, which lot, the values and the limit, link the chart point, and escape HTML', () => {
    const m = composeAlarmMail(facts, 'https://prismline.plant.example/', 'line L1');
    expect(m.subject).toBe('Prismline alarm: Out of specification — HVL25-RC28, lot L1-261102-E1');
    expect(m.text).toContain('What happened: Lot L1-261102-E1');
    expect(m.text).toContain('Values: 24.1, 24.3, 23.9, 24.2, 24.4, 24.0 MPa');
    expect(m.text).toContain('Limit: lower specification limit (LSL) 25.00 MPa');
    expect(m.text).toContain('Chart: https://prismline.plant.example/charts/12?point=140');
    expect(m.text).toContain('Position: Late result');
    expect(m.text).toMatch(/subscribed to immediate alerts for line L1/);
    expect(m.text).toMatch(/does not replace their judgement/);
    expect(m.html).toContain('&lt;C25&gt;');
    expect(m.html).not.toContain('<C25>');
    expect(m.html).toContain('<a href="https://prismline.plant.example/charts/12?point=140">');
  });
});

describe('retry pause of a failed send', () => {
  it('doubles from 5 s and stops growing at one hour', () => {
    expect([1, 2, 3, 4, 5].map(backoffSeconds)).toEqual([5, 10, 20, 40, 80]);
    expect(backoffSeconds(30)).toBe(3600);
  });
});
