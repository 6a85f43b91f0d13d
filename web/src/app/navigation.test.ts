import { describe, expect, it } from 'vitest';
import { areas, areasFor } from './navigation';
import { roles } from '@shared/schemas/users';

// The role rules of the foundation issue, with results entry's: auditors read the upload history
// and the test methods, and everyone reads specifications and process events; everyone follows the
// SPC runs and manages their own alert e-mails; the mail outbox is the administrator's; the audit trail is the auditor's and the administrator's.
const expected = {
  technician: ['overview', 'charts', 'results', 'methods', 'records', 'alarms', 'runs', 'ncrs', 'subscriptions'],
  quality_manager: ['overview', 'charts', 'results', 'methods', 'records', 'alarms', 'runs', 'ncrs', 'reports', 'subscriptions', 'mail-log'],
  auditor: ['overview', 'charts', 'results', 'methods', 'records', 'alarms', 'runs', 'ncrs', 'reports', 'audit-trail', 'subscriptions'],
  admin: ['overview', 'charts', 'results', 'methods', 'records', 'alarms', 'runs', 'ncrs', 'reports', 'audit-trail', 'subscriptions', 'mail-log', 'users', 'catalogue', 'plant', 'outbox'],
} as const;

describe('navigation', () => {
  it.each(roles)('gives the %s exactly their areas', (role) => {
    expect(areasFor(role).map((area) => area.id)).toEqual(expected[role]);
  });

  it('gives every area its own address', () => {
    const paths = areas.map((area) => area.path);
    expect(new Set(paths).size).toBe(paths.length);
  });
});
