import { describe, expect, it } from 'vitest';
import { areas, areasFor } from './navigation';
import { roles } from '../../../shared/schemas/users';

// The role rules of the foundation issue, with results entry's: auditors read the upload history
// and the test methods, and everyone reads specifications and process events.
const expected = {
  technician: ['overview', 'charts', 'results', 'methods', 'records'],
  quality_manager: ['overview', 'charts', 'results', 'methods', 'records', 'alarms', 'ncrs', 'reports'],
  auditor: ['overview', 'charts', 'results', 'methods', 'records', 'alarms', 'ncrs', 'reports'],
  admin: ['overview', 'charts', 'results', 'methods', 'records', 'alarms', 'ncrs', 'reports', 'users', 'catalogue'],
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
