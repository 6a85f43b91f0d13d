// The authorisation matrix: every protected route, each demo role, against the one permissions map.
// Bodies and ids are deliberately invalid, so an allowed role gets a 4xx from validation and no demo record changes.
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';
import { may, permissions, type Permission } from '@shared/permissions';
import { roles, type Role } from '@shared/schemas/roles';
import { areas } from '@web/app/navigation';

const api = createTestApi();
afterAll(() => api.close());

interface ProtectedRoute {
  method: 'get' | 'post' | 'patch' | 'delete';
  path: string;
  /** The action the route requires. */
  permission: Permission;
  /** A body that validation refuses, so that an allowed role changes nothing. */
  body?: object;
  /** What an allowed role gets for that body: 400 unless the route answers otherwise. */
  allowed?: number;
}

const routes: ProtectedRoute[] = [
  { method: 'post', path: '/api/v1/uploads', permission: 'upload.create', body: {} },
  { method: 'post', path: '/api/v1/uploads/0/void', permission: 'upload.void', body: {} },
  { method: 'post', path: '/api/v1/measurements', permission: 'measurement.create', body: {} },
  { method: 'patch', path: '/api/v1/measurements/0', permission: 'measurement.correct', body: {} },
  { method: 'post', path: '/api/v1/column-mappings', permission: 'column-mapping.create', body: {} },
  { method: 'post', path: '/api/v1/process-events', permission: 'process-event.create', body: {} },
  { method: 'post', path: '/api/v1/characteristics/0/spec-revisions', permission: 'specification.revise', body: {} },
  { method: 'post', path: '/api/v1/characteristics/0/limit-revisions', permission: 'limits.freeze', body: {} },
  { method: 'post', path: '/api/v1/characteristics/0/exclusions', permission: 'point.exclude', body: {} },
  { method: 'delete', path: '/api/v1/characteristics/0/exclusions/0', permission: 'point.exclude', body: {} },
  { method: 'post', path: '/api/v1/spc-runs', permission: 'spc-run.start', body: { characteristicIds: [] } },
  // Alarms: every role reads them; managers triage them.
  { method: 'get', path: '/api/v1/alarms?limit=1', permission: 'alarm.read', allowed: 200 },
  { method: 'get', path: '/api/v1/alarms/0', permission: 'alarm.read' },
  { method: 'patch', path: '/api/v1/alarms/0', permission: 'alarm.triage', body: {} },
  { method: 'post', path: '/api/v1/alarms/0/comments', permission: 'alarm.triage', body: {} },
  { method: 'post', path: '/api/v1/alarms/acknowledge', permission: 'alarm.triage', body: {} },
  { method: 'post', path: '/api/v1/alarm-groups', permission: 'alarm.triage', body: {} },
  { method: 'get', path: '/api/v1/alarm-groups/0', permission: 'alarm.read' },
  { method: 'get', path: '/api/v1/mail-log?pageSize=1', permission: 'mail.read', allowed: 200 },
  { method: 'get', path: '/api/v1/mail-log/0', permission: 'mail.read' },
  { method: 'get', path: '/api/v1/audit-events?limit=1', permission: 'audit.read', allowed: 200 },
  { method: 'get', path: '/api/v1/audit-events/facets', permission: 'audit.read', allowed: 200 },
  { method: 'get', path: '/api/v1/audit-events/verify', permission: 'audit.read', allowed: 200 },
  { method: 'get', path: '/api/v1/audit-events.csv?entity=nothing', permission: 'audit.read' },
  { method: 'post', path: '/api/v1/lines', permission: 'catalogue.manage', body: {} },
  { method: 'patch', path: '/api/v1/lines/0', permission: 'catalogue.manage', body: {} },
  // Never deleted: an allowed role learns to deactivate instead (405).
  { method: 'delete', path: '/api/v1/lines/1', permission: 'catalogue.manage', allowed: 405 },
  { method: 'post', path: '/api/v1/products', permission: 'catalogue.manage', body: {} },
  { method: 'patch', path: '/api/v1/products/0', permission: 'catalogue.manage', body: {} },
  { method: 'delete', path: '/api/v1/products/1', permission: 'catalogue.manage', allowed: 405 },
  { method: 'post', path: '/api/v1/characteristics', permission: 'catalogue.manage', body: {} },
  { method: 'patch', path: '/api/v1/characteristics/0', permission: 'catalogue.manage', body: {} },
  { method: 'delete', path: '/api/v1/characteristics/1', permission: 'catalogue.manage', allowed: 405 },
  { method: 'patch', path: '/api/v1/plants/0', permission: 'plant.manage', body: {} },
  // The lot search of the header: every signed-in role.
  { method: 'get', path: '/api/v1/lots?q=L&limit=1', permission: 'plant.read', allowed: 200 },
  { method: 'get', path: '/api/v1/lots?status=on-hold&limit=1', permission: 'plant.read', allowed: 200 },
  // Lab staff hold a lot; only a quality manager releases it. The empty reason is refused before the lot is looked up.
  { method: 'post', path: '/api/v1/lots/NO-SUCH-LOT/hold', permission: 'lot.hold', body: {} },
  { method: 'post', path: '/api/v1/lots/NO-SUCH-LOT/release', permission: 'lot.release', body: {} },
  // The assignee and owner pick lists: every signed-in role.
  { method: 'get', path: '/api/v1/people', permission: 'plant.read', allowed: 200 },
  // Nonconformance reports: every role reads; lab staff raise and add evidence; managers run them.
  { method: 'get', path: '/api/v1/ncrs?limit=1', permission: 'ncr.read', allowed: 200 },
  { method: 'get', path: '/api/v1/ncrs/overdue-actions?limit=1', permission: 'ncr.read', allowed: 200 },
  { method: 'get', path: '/api/v1/ncrs/0', permission: 'ncr.read' },
  { method: 'get', path: '/api/v1/ncrs/0/attachments/0', permission: 'ncr.read' },
  { method: 'post', path: '/api/v1/ncrs', permission: 'ncr.raise', body: {} },
  { method: 'post', path: '/api/v1/ncrs/0/attachments', permission: 'ncr.raise', body: {} },
  { method: 'patch', path: '/api/v1/ncrs/0/actions/0', permission: 'ncr.raise', body: {} },
  { method: 'patch', path: '/api/v1/ncrs/0', permission: 'ncr.manage', body: {} },
  { method: 'post', path: '/api/v1/ncrs/0/transitions', permission: 'ncr.manage', body: {} },
  { method: 'post', path: '/api/v1/ncrs/0/actions', permission: 'ncr.manage', body: {} },
  // Capability reports: read by auditors, quality managers and administrators; no period is a 400.
  { method: 'get', path: '/api/v1/reports/capability?product=1', permission: 'report.read' },
  { method: 'get', path: '/api/v1/reports/capability.pdf?product=1', permission: 'report.read' },
  { method: 'get', path: '/api/v1/reports/capability.csv?product=1', permission: 'report.read' },
  // The audit pack holds the audit trail: auditors and administrators only.
  { method: 'get', path: '/api/v1/reports/audit-pack.zip?product=1', permission: 'audit.read' },
  { method: 'get', path: '/api/v1/users', permission: 'user.manage', allowed: 200 },
  { method: 'post', path: '/api/v1/users', permission: 'user.manage', body: {} },
  { method: 'patch', path: '/api/v1/users/0', permission: 'user.manage', body: {} },
];

const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });
const send = (route: ProtectedRoute, headers: Record<string, string> = {}) => {
  const req = request(api.app)[route.method](route.path).set(headers);
  return route.body ? req.send(route.body) : req;
};
const label = (route: ProtectedRoute) => `${route.method.toUpperCase()} ${route.path} (${route.permission})`;

describe('authorisation matrix', () => {
  describe.each(routes)('$method $path', (route) => {
    it.each(roles)(`answers the %s as the permissions map says`, async (role) => {
      const res = await send(route, await as(role));
      if (may(role, route.permission)) {
        expect(res.status, label(route)).not.toBe(403);
        expect(res.status, label(route)).toBe(route.allowed ?? 400);
      } else {
        expect(res.status, label(route)).toBe(403);
        expect(res.body.error).toBe('Your role does not allow this action');
      }
    });

    it('asks for a session first (401)', async () => {
      expect((await send(route)).status).toBe(401);
    });
  });

  it('uses every action of the map on a route above or on an area of the menu', () => {
    const used = new Set<Permission>([...routes.map((r) => r.permission), ...areas.map((a) => a.permission)]);
    const unused = (Object.keys(permissions) as Permission[]).filter((action) => !used.has(action));
    expect(unused).toEqual([]);
  });
});

// The people of the product brief (/work/shared/product-brief.md, "The people and their day"), checked
// against the map independently of it: a slip in the map itself shows here.
describe('the map keeps the roles of the product brief', () => {
  const writes = routes.filter((r) => r.method !== 'get');
  it('leaves the auditor read-only: refused on every write route', () => {
    expect(writes.filter((r) => may('auditor', r.permission)).map(label)).toEqual([]);
  });

  it('lets the QC technician enter and upload results and fix rejected rows', () => {
    for (const action of ['upload.create', 'measurement.create', 'measurement.correct'] as const) expect(may('technician', action), action).toBe(true);
  });

  it('lets the quality manager triage alarms, freeze limits and maintain specifications, and not manage users or the catalogue', () => {
    for (const action of ['alarm.triage', 'limits.freeze', 'specification.revise'] as const) expect(may('quality_manager', action), action).toBe(true);
    for (const action of ['user.manage', 'catalogue.manage'] as const) expect(may('quality_manager', action), action).toBe(false);
  });

  it("lets only the administrator manage users, products, lines, characteristics and the plant's settings", () => {
    for (const action of ['user.manage', 'catalogue.manage', 'plant.manage'] as const) expect(roles.filter((role) => may(role, action)), action).toEqual(['admin']);
  });
});
