import { describe, expect, it } from 'vitest';
import nodemailer, { type SendMailOptions } from 'nodemailer';
import { readMessage, startFakeSmtp } from './fake-smtp';
import { backoffSeconds, createTransport } from './outbox';
import { composeDigest, composeLotMail, type LotMailFacts, type SignalFacts } from './compose';

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
  // One lot with three readings beyond the specification and beyond the control limit on two charts:
  // one message lists all of it (before, each alarm was a message of its own).
  const signal = (over: Partial<SignalFacts>): SignalFacts => ({
    alarmId: 1, rule: 'out-of-spec', characteristicId: 12, characteristicCode: 'HVL25-DENS', characteristicName: 'Fresh mortar density', unit: 'kg/m³', decimals: 0,
    description: 'Lot result 1,501 kg/m³ above the upper specification limit 1,500 kg/m³ <C25>.', lateReason: null, detectedAt: new Date('2026-11-03T02:00:00Z'), ...over,
  });
  const lot: LotMailFacts = {
    lotId: 5, lotNumber: 'L1-261102-E1', producedAt: new Date('2026-07-02T06:30:00Z'), shift: 'early', productCode: 'HVL25', productName: 'HV Level 25', lineCode: 'L1',
    signals: [
      signal({ alarmId: 3, rule: 'we1', description: 'Subgroup mean 1,501 kg/m³ above the upper control limit 1,490 kg/m³.' }),
      signal({}),
      signal({ alarmId: 4, rule: 'trend', characteristicId: 13, characteristicCode: 'HVL25-FLOW', characteristicName: 'Flow', unit: 'mm', description: 'Six points in a row each rise above the one before.' }),
    ],
  };
  const clock = { timeZone: 'Europe/London', dateFormat: 'dd/MM/yyyy' as const };

  it('tell every signal of the lot in one message, most severe first, with links to the chart at the lot and to the lot page', () => {
    const m = composeLotMail(lot, 'https://prismline.plant.example/', 'line L1', clock);
    expect(m.subject).toBe('Prismline alarm: lot L1-261102-E1 — Out of specification, Beyond a control limit, Six in a row rising or falling (HVL25-DENS, HVL25-FLOW)');
    expect(m.text).toMatch(/^3 signals on lot L1-261102-E1/);
    const order = ['Out of specification', 'Beyond a control limit', 'Six in a row'].map((w) => m.text.indexOf(w, m.text.indexOf('1. ')));
    expect(order).toEqual([...order].sort((a, b) => a - b));
    expect(m.text).toContain('Chart: https://prismline.plant.example/charts/12?lot=L1-261102-E1');
    expect(m.text).toContain('Chart: https://prismline.plant.example/charts/13?lot=L1-261102-E1');
    expect(m.text).toContain('Lot page: https://prismline.plant.example/results/lots/L1-261102-E1');
    expect(m.text).toMatch(/subscribed to immediate alerts for line L1/);
    expect(m.text).toMatch(/does not replace their judgement/);
    expect(m.html).toContain('&lt;C25&gt;');
    expect(m.html).not.toContain('<C25>');
  });

  it('write times in plant time, the zone named once, and never a rule identifier or "UTC"', () => {
    const m = composeLotMail(lot, 'https://prismline.plant.example/', 'line L1', clock);
    // 06:30 UTC on 2 July is 07:30 in London (British Summer Time, UTC+1: the UK's statutory summer time).
    expect(m.text).toContain('Lot: L1-261102-E1, produced 02/07/2026 07:30, early shift');
    expect(m.text).toContain('Times are plant time (Europe/London, BST)');
    for (const body of [m.subject, m.text, m.html]) {
      expect(body).not.toMatch(/\bwe[1-4]\b|\bUTC\b/);
    }
    const digest = composeDigest([lot], 'https://prismline.plant.example/', { from: new Date('2026-11-02T06:00:00Z'), to: new Date('2026-11-03T06:00:00Z') }, clock);
    expect(digest.subject).toBe('Prismline morning digest 03/11/2026: 3 new signals on 1 lot');
    expect(digest.text).toContain('from 02/11/2026 06:00 to 03/11/2026 06:00');
    expect(digest.text).not.toMatch(/\bwe[1-4]\b|\bUTC\b/);
  });
});

describe('retry pause of a failed send', () => {
  it('doubles from 5 s and stops growing at one hour', () => {
    expect([1, 2, 3, 4, 5].map(backoffSeconds)).toEqual([5, 10, 20, 40, 80]);
    expect(backoffSeconds(30)).toBe(3600);
  });
});
