// The words of NCR e-mails and of the digest's NCR section: specific facts and a link, plant dates.
import { describe, expect, it } from 'vitest';
import { composeDigest } from './compose';
import { composeNcrActionReminder, composeNcrMail, type NcrMailFacts } from './ncr-mail';

const ncr: NcrMailFacts = {
  id: 42,
  number: 'NCR-2026-0007',
  title: 'Flow below specification on three lots',
  description: 'Early flow 128 mm against a lower limit of 135 mm.',
  severity: 'major',
  status: 'open',
  productCode: 'HVL25',
  productName: 'Levelling compound 25',
  lineCode: 'L1',
  lotNumbers: ['L1-261130-E1', 'L1-261130-E2'],
  assigneeName: 'Quinn Manager',
};
const clock = { timeZone: 'Europe/London', dateFormat: 'dd/MM/yyyy' as const };

describe('NCR e-mails', () => {
  it('tell what happened, who did it, the NCR, product, lots and a link, with the reason of a reopening', () => {
    const m = composeNcrMail({ ...ncr, status: 'open' }, 'reopened', { actorName: 'Ada Admin', reason: 'Flow low again' }, 'https://prismline.plant.example/');
    expect(m.subject).toBe('Prismline NCR reopened: NCR-2026-0007 — Flow below specification on three lots (HVL25)');
    for (const fact of ['NCR-2026-0007 was reopened by Ada Admin.', 'Reason: Flow low again', 'Product: HVL25 · Levelling compound 25 (line L1)', 'Lots: L1-261130-E1, L1-261130-E2', 'Page: https://prismline.plant.example/ncrs/42'])
      expect(m.text).toContain(fact);
    expect(m.html).toContain('<a href="https://prismline.plant.example/ncrs/42">');
    expect(composeNcrMail(ncr, 'raised', { actorName: 'Tom' }, 'http://x').text).toContain('Description: Early flow 128 mm');
  });

  it('escape HTML in what people typed', () => {
    expect(composeNcrMail({ ...ncr, title: '<script>x</script>' }, 'closed', { actorName: 'A' }, 'http://x').html).not.toContain('<script>');
  });

  it('remind of an action with its due day in the plant’s date format', () => {
    const m = composeNcrActionReminder(ncr, { actionId: 9, kind: 'corrective', description: 'Level the flow table', ownerName: 'Tom', dueDate: '2026-12-03' }, 'overdue', 'http://x', clock);
    expect(m.subject).toBe('Prismline NCR action overdue: NCR-2026-0007 — action #9 due 03/12/2026');
    expect(m.text).toContain('was due on 03/12/2026 and is not recorded as done');
  });
});

describe('digest NCR section', () => {
  const period = { from: new Date('2026-12-02T06:00:00Z'), to: new Date('2026-12-03T06:00:00Z') };
  it('lists the NCRs raised, open and the overdue actions, bounded, and names them in the subject', () => {
    const item = { id: 42, number: ncr.number, title: ncr.title, severity: 'major', status: 'open', productCode: 'HVL25' };
    const d = composeDigest([], 'http://x', period, clock, {
      open: [item],
      openCount: 25,
      raised: [item],
      raisedCount: 1,
      overdue: [{ ncrId: 42, ncrNumber: ncr.number, actionId: 9, description: 'Level the flow table', ownerName: 'Tom', dueDate: '2026-12-01' }],
      overdueCount: 1,
    });
    expect(d.subject).toBe('Prismline morning digest 03/12/2026: no new signals; 1 NCR raised; 1 NCR action overdue');
    expect(d.text).toContain('Nonconformance reports\n  Raised in the period: 1\n  - NCR-2026-0007 (major, open, HVL25): Flow below specification on three lots http://x/ncrs/42');
    expect(d.text).toContain('  Open now: 25');
    expect(d.text).toContain('  … and 24 more');
    expect(d.text).toContain('  - Action #9 of NCR-2026-0007, due 01/12/2026, owner Tom: Level the flow table http://x/ncrs/42');
  });

  it('leaves the digest without NCRs as it was', () => {
    expect(composeDigest([], 'http://x', period, clock).text).not.toContain('Nonconformance reports');
  });
});
