import { describe, expect, it } from 'vitest';
import type { AlarmView } from '@shared/schemas/alarms';
import { formatFileSize } from './file-size';
import { ncrListSearchParams, readNcrListSearch } from './list-filter';
import { alarmIdsOf, prefillFromAlarms } from './raise-prefill';
import { readRefusal } from './refusal';

describe('file sizes', () => {
  it('counts in SI prefixes: kilo = 10³, mega = 10⁶ (SI Brochure, 9th edition, table 7)', () => {
    expect(formatFileSize(0)).toBe('0 B');
    expect(formatFileSize(999)).toBe('999 B');
    expect(formatFileSize(1000)).toBe('1.0 kB');
    expect(formatFileSize(1536)).toBe('1.5 kB');
    expect(formatFileSize(10 * 1024 * 1024)).toBe('10.5 MB');
    expect(formatFileSize(-1)).toBe('');
  });
});

describe('the NCR list filter in the address', () => {
  it('reads what it knows and drops what makes no sense', () => {
    expect(readNcrListSearch(new URLSearchParams('status=actions-pending&severity=critical&product=3&assignee=12&overdue=1&q=%20L1-26%20'))).toEqual({
      status: 'actions-pending',
      severity: 'critical',
      productId: 3,
      assigneeId: 12,
      overdue: true,
      q: 'L1-26',
    });
    // An unknown state, a product that is no id, an id beyond a PostgreSQL integer (2,147,483,647, PostgreSQL manual 8.1.1).
    expect(readNcrListSearch(new URLSearchParams('status=pending&severity=huge&product=x&assignee=2147483648&overdue=yes'))).toEqual({
      status: undefined,
      severity: undefined,
      productId: undefined,
      assigneeId: undefined,
      overdue: false,
      q: '',
    });
    expect(readNcrListSearch(new URLSearchParams(`q=${'a'.repeat(300)}`)).q).toHaveLength(100);
  });

  it('writes only what narrows the list, and reads back the same filter', () => {
    const search = { status: 'open', productId: 4, overdue: true, q: 'NCR-2026' } as const;
    const params = ncrListSearchParams({ ...search, severity: undefined, assigneeId: undefined });
    expect(params.toString()).toBe('status=open&product=4&overdue=1&q=NCR-2026');
    expect(readNcrListSearch(params)).toEqual({ ...search, severity: undefined, assigneeId: undefined });
    expect(ncrListSearchParams({ overdue: false, q: '' }).toString()).toBe('');
  });
});

const alarm = (id: number, code: string, productCode: string, lotNumber: string, signal: string) =>
  ({ id, signal, characteristic: { id: 1, code, name: code, unit: 'mm', decimals: 0, productCode, lineCode: 'L1' }, lot: { id: 1, lotNumber, producedAt: '2026-12-01T06:00:00Z' } }) as AlarmView;

describe('an NCR raised from alarms', () => {
  it('takes one product, each lot once, and a title in a line', () => {
    expect(prefillFromAlarms([alarm(1, 'HVL25-FLOW', 'HVL25', 'L1-1', 'Beyond the lower specification limit')])).toEqual({
      title: 'HVL25-FLOW: Beyond the lower specification limit — lot L1-1',
      productCode: 'HVL25',
      lotNumbers: ['L1-1'],
    });
    expect(prefillFromAlarms([alarm(1, 'HVL25-FLOW', 'HVL25', 'L1-1', 'a'), alarm(2, 'HVL25-FLOW', 'HVL25', 'L1-2', 'b'), alarm(3, 'HVL25-FLOW', 'HVL25', 'L1-1', 'c')])).toEqual({
      title: 'HVL25-FLOW: 3 signals — 2 lots',
      productCode: 'HVL25',
      lotNumbers: ['L1-1', 'L1-2'],
    });
    // Two products: the person chooses the product.
    expect(prefillFromAlarms([alarm(1, 'HVL25-FLOW', 'HVL25', 'L1-1', 'a'), alarm(2, 'HVFX-DENS', 'HVFX', 'L2-1', 'b')])).toMatchObject({
      title: '2 signals on 2 characteristics of HVL25, HVFX — 2 lots',
      productCode: '',
    });
    expect(prefillFromAlarms([])).toEqual({ title: '', productCode: '', lotNumbers: [] });
  });

  it('reads ?alarms= as whole ids, each once, at most 100', () => {
    expect(alarmIdsOf('3,1, 3,x,0,-2,2147483648,7')).toEqual([3, 1, 7]);
    expect(alarmIdsOf(null)).toEqual([]);
    expect(alarmIdsOf(Array.from({ length: 150 }, (_, i) => i + 1).join(','))).toHaveLength(100);
  });
});

describe('a refused NCR write', () => {
  it('shows the lead of a refused closing and each thing missing once', () => {
    const blockers = ['Write the root-cause analysis.', 'A quality manager has not approved it yet.'];
    expect(readRefusal(`The NCR cannot be closed yet: ${blockers.join(' ')}`, blockers.map((message) => ({ path: 'closing', message })))).toEqual({
      lead: 'The NCR cannot be closed yet:',
      points: blockers,
    });
  });

  it('keeps the sentence of a refused step without repeating the state codes of its details', () => {
    const message = 'An NCR that is open cannot move to closed; it may move to: Investigating';
    expect(readRefusal(message, [{ path: 'to', message: 'investigating' }])).toEqual({ lead: message, points: [] });
  });

  it('lists field details the sentence does not already say', () => {
    expect(readRefusal('title: Give a title', [{ path: 'title', message: 'Give a title' }, { path: 'severity', message: 'Choose a severity' }])).toEqual({
      lead: 'title: Give a title',
      points: ['Choose a severity'],
    });
  });
});
