// Every action the audit trail can record reads as a sentence, whatever its before and after hold.
// The list of actions is the project's own (audit-actions.ts); that a trail names every change in plain
// words is the expectation of factory production control records (common practice).
import { describe, expect, it } from 'vitest';
import { auditActions, type AuditEntity } from '@api/db/audit-actions';
import { auditLink, auditSentence } from './words';

const pairs = (Object.keys(auditActions) as AuditEntity[]).flatMap((entity) => (auditActions[entity] as readonly string[]).map((action) => [entity, action] as const));

describe('audit sentences', () => {
  it.each(pairs)('%s / %s has its own sentence', (entity, action) => {
    for (const facts of [
      { id: '17', label: null, before: null, after: null },
      { id: 'L1-2611-03', label: 'HV-L25', before: { status: 'open' }, after: { status: 'closed', revision: 3, title: 'Low flow' } },
      { id: '3', label: null, before: 'text', after: [1, 2] },
    ]) {
      const s = auditSentence(entity, action, facts);
      // The fallback for unknown pairs repeats the raw words; a sentence of its own never does.
      expect(s, `${entity} ${action}`).not.toBe(`${action} ${entity}${facts.id ? ` ${facts.id}` : ''}`);
      expect(s).toMatch(/^[A-Z]/);
      expect(s).not.toMatch(/undefined|null|\[object|NaN|\s$|\s\s/);
    }
  });

  it('reads an action it does not know plainly instead of failing', () => {
    expect(auditSentence('pallet', 'stack', { id: '4', label: null, before: null, after: null })).toBe('stack pallet 4');
    expect(auditSentence('lot', 'toString', { id: '4', label: null, before: null, after: null })).toBe('toString lot 4');
  });

  it('links a record to its page only where it has one', () => {
    expect(auditLink('lot', 'L1/26 A')).toBe('/results/lots/L1%2F26%20A');
    expect(auditLink('ncr', '12')).toBe('/ncrs/12');
    expect(auditLink('ncr', '12; drop')).toBeNull();
    expect(auditLink('alarm', '5')).toBe('/alarms/5');
    expect(auditLink('characteristic', '3')).toBe('/charts/3');
    expect(auditLink('upload', '9')).toBe('/results/history');
    expect(auditLink('plant', '1')).toBeNull();
    expect(auditLink('lot', null)).toBeNull();
  });
});
