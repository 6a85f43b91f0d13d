// Every write route of the app leaves an audit event in the transaction of its change, and the auditor is
// refused on each. The route table is read from the app itself (Express 5's router stack), so a write route
// added later with neither a recipe nor a written exemption below fails the first test here.
//
// Sources: 21 CFR 11.10(e) asks for "secure, computer-generated, time-stamped audit trails to independently
// record the date and time of operator entries and actions that create, modify, or delete electronic
// records"; ISO 9001:2015 7.5.3 asks that changes of retained documented information be controlled (from
// memory). "Same transaction" is read from PostgreSQL's system column xmin, "the identity (transaction ID) of
// the inserting transaction for this row version" (PostgreSQL documentation, 5.6 System Columns): an audit
// event and the row it describes carry the same xmin only when one transaction wrote both.
import type { Express } from 'express';
import { Router } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql, type SQL } from 'drizzle-orm';
import { createApp } from '@api/app';
import { createDatabase } from '@api/db/client';
import type { AuditEntity } from '@api/db/audit-actions';
import { importResults } from '@api/ingest/import';
import { excludePoint } from '@api/spc/chart-commands';
import { lazyQueue } from '@api/spc/queue';
import { databaseUrl, demoEmail, demoTokens, TEST_JWT_SECRET } from '@tests/support/api';
import { catalogueTestKit, removeCatalogueRecords, testCodePrefix } from '@tests/support/catalogue';
import { createTestCharacteristic, removeTestCharacteristics, testDay, testPair, userIdByEmail, type TestCharacteristic } from '@tests/support/plant';
import type { Role } from '@shared/schemas/roles';

const db = createDatabase(databaseUrl(), 4);
const queue = lazyQueue(db.$client);
// The default follow-up of results: only limit and chart-setting changes start a run (api/app.ts).
const app = createApp({ db, config: { jwtSecret: TEST_JWT_SECRET, loginAttemptsPer15Min: 50 }, serveWeb: false, spcQueue: queue });
const tokenFor = demoTokens(app);
const as = async (role: Role) => ({ authorization: `Bearer ${await tokenFor(role)}` });

const WRITE_METHODS = new Set(['post', 'put', 'patch', 'delete', '_all']);

interface StackLayer {
  rawPath?: unknown;
  route?: { path: unknown; methods: Record<string, boolean> };
  handle?: { stack?: StackLayer[] };
}

/** "METHOD /full/path" of every write route of an app, found by walking its router stack and every router mounted in it. */
function writeRoutesOf(target: Express): string[] {
  const found: string[] = [];
  const join = (prefix: string, path: unknown) => {
    if (typeof path !== 'string') throw new Error(`A route or mount path that is not a string (${String(path)}): list it by hand here`);
    return path === '/' ? prefix || '/' : `${prefix}${path}`;
  };
  const walk = (stack: StackLayer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const method of Object.keys(layer.route.methods)) if (WRITE_METHODS.has(method)) found.push(`${method === '_all' ? 'ALL' : method.toUpperCase()} ${join(prefix, layer.route.path)}`);
      } else if (layer.handle?.stack) {
        walk(layer.handle.stack, join(prefix, layer.rawPath ?? '/').replace(/\/$/, ''));
      }
    }
  };
  walk((target as unknown as { router: { stack: StackLayer[] } }).router.stack, '');
  return [...new Set(found)].sort();
}

/**
 * Write routes without a recipe, each with why. Everything else needs a recipe below.
 */
const exemptions: Record<string, string> = {
  'POST /api/v1/auth/login':
    'its events (sign-in, each kind of refusal, the first throttled attempt of a window) need wrong passwords and the limiter: api/routes/auth/auth.test.ts checks them',
  'DELETE /api/v1/lines/:id': 'answers 405 and changes nothing: a line is deactivated (PATCH), never deleted',
  'DELETE /api/v1/products/:id': 'answers 405 and changes nothing: a product is deactivated (PATCH), never deleted',
  'DELETE /api/v1/characteristics/:id': 'answers 405 and changes nothing: a characteristic is deactivated (PATCH), never deleted',
};

/**
 * Write routes every signed-in role may use, so the auditor is not refused there. Signing in and out is
 * everyone's; an e-mail subscription is the user's own alert setting ('plant.read' in shared/permissions.ts),
 * no quality record.
 */
const openToEveryRole: Record<string, string> = {
  'POST /api/v1/auth/login': 'signing in',
  'POST /api/v1/auth/logout': 'signing out',
  'POST /api/v1/subscriptions': "the user's own e-mail alerts",
  'PATCH /api/v1/subscriptions/:id': "the user's own e-mail alerts",
  'DELETE /api/v1/subscriptions/:id': "the user's own e-mail alerts",
};

/** The records the recipes work on: this file's own, never the demo plant's. */
interface Fixtures {
  t: TestCharacteristic;
  u: TestCharacteristic;
  lotId: Record<string, number>;
  ids: Record<'technician' | 'manager' | 'admin', number>;
  uploadToVoid: number;
  measurementToCorrect: number;
  alarmIds: number[];
  ncrId: number;
  actionId: number;
  subscriptionToChange: number;
  subscriptionToDelete: number;
  line: { id: number; code: string };
  product: { id: number; code: string };
  characteristicId: number;
  userId: number;
  plantId: number;
}
let f: Fixtures;
const prefix = testCodePrefix('W');
const kit = catalogueTestKit({ app, db, tokenFor, close: async () => undefined }, prefix);
const createdUsers: number[] = [];
const createdMappings: number[] = [];
const createdPlants: number[] = [];

type Answer = request.Response;
interface Recipe {
  /** A role allowed the route. */
  role: Role;
  send: (headers: Record<string, string>) => Promise<Answer> | request.Test;
  /** The status of success. */
  status: number;
  entity: AuditEntity;
  action: string;
  /** The audit event's entity id, from the answer, the fixtures or the signed-in user. */
  entityId: (res: Answer, actorId: number) => string | number;
  /** A query answering the xmin of a row the request wrote (null: the request leaves no row but its event). */
  written: ((res: Answer) => SQL) | null;
}

const xminOf = (table: string, id: number) => sql`select xmin::text as xmin from ${sql.identifier(table)} where id = ${id}`;
const newestOf = (table: string, column: string, value: number) =>
  sql`select xmin::text as xmin from ${sql.identifier(table)} where ${sql.identifier(column)} = ${value} order by id desc limit 1`;
const reason = 'Checked against the lab notebook of the shift';

const recipes: Record<string, Recipe> = {
  'POST /api/v1/auth/logout': {
    role: 'auditor',
    send: (h) => request(app).post('/api/v1/auth/logout').set(h),
    status: 204,
    entity: 'user',
    action: 'sign-out',
    entityId: (_res, actorId) => actorId,
    written: null,
  },
  'POST /api/v1/users': {
    role: 'admin',
    send: (h) => request(app).post('/api/v1/users').set(h).send({ email: `${prefix.toLowerCase()}-new@harrowvale.example`, name: 'Coverage Newcomer', role: 'technician', password: 'a-long-enough-password' }),
    status: 201,
    entity: 'user',
    action: 'create',
    entityId: (res) => (createdUsers.push(res.body.id), res.body.id),
    written: (res) => xminOf('users', res.body.id),
  },
  'PATCH /api/v1/users/:id': {
    role: 'admin',
    send: (h) => request(app).patch(`/api/v1/users/${f.userId}`).set(h).send({ name: 'Coverage Renamed', active: false }),
    status: 200,
    entity: 'user',
    action: 'update',
    entityId: () => f.userId,
    written: () => xminOf('users', f.userId),
  },
  'POST /api/v1/uploads': {
    role: 'technician',
    send: (h) =>
      request(app)
        .post('/api/v1/uploads')
        .set(h)
        .attach('file', Buffer.from(`lot,product,line,produced_at,characteristic,value,replicate\n${f.u.lotNumber('UP')},${f.u.productCode},L1,${testDay(40)},${f.u.code},146,1\n`), 'coverage.csv'),
    status: 201,
    entity: 'upload',
    action: 'import',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('uploads', res.body.id),
  },
  'POST /api/v1/uploads/:id/void': {
    role: 'quality_manager',
    send: (h) => request(app).post(`/api/v1/uploads/${f.uploadToVoid}/void`).set(h).send({ reason }),
    status: 200,
    entity: 'upload',
    action: 'void',
    entityId: () => f.uploadToVoid,
    written: () => xminOf('uploads', f.uploadToVoid),
  },
  'POST /api/v1/measurements': {
    role: 'technician',
    send: (h) =>
      request(app)
        .post('/api/v1/measurements')
        .set(h)
        .send({ lot: f.u.lotNumber('ME'), product: f.u.productCode, line: 'L1', producedAt: testDay(41).slice(0, 16), results: [{ characteristic: f.u.code, replicates: [145, 146] }] }),
    status: 201,
    entity: 'measurement',
    action: 'manual entry',
    entityId: (res) => res.body.measurementIds[0],
    written: (res) => xminOf('measurements', res.body.measurementIds[0]),
  },
  'PATCH /api/v1/measurements/:id': {
    role: 'technician',
    send: (h) => request(app).patch(`/api/v1/measurements/${f.measurementToCorrect}`).set(h).send({ value: 151, reason: 'Digits swapped when typing' }),
    status: 200,
    entity: 'measurement',
    action: 'correct',
    entityId: () => f.measurementToCorrect,
    written: () => xminOf('measurements', f.measurementToCorrect),
  },
  'POST /api/v1/column-mappings': {
    role: 'technician',
    send: (h) =>
      request(app)
        .post('/api/v1/column-mappings')
        .set(h)
        .send({ name: `${prefix} press export`, mapping: { format: 'wide', columns: { lot: 'Batch', product: 'Product', line: 'Line', produced_at: 'Made' }, characteristicColumns: { 'Flow A': 'HVL25-FLOW' } } }),
    status: 201,
    entity: 'column mapping',
    action: 'create',
    entityId: (res) => (createdMappings.push(res.body.id), res.body.id),
    written: (res) => xminOf('column_mappings', res.body.id),
  },
  'POST /api/v1/characteristics/:id/exclusions': {
    role: 'quality_manager',
    send: (h) => request(app).post(`/api/v1/characteristics/${f.t.characteristicId}/exclusions`).set(h).send({ lotId: f.lotId.T3, reason: 'Specimen cracked before testing' }),
    status: 201,
    entity: 'characteristic',
    action: 'exclude point',
    entityId: () => f.t.characteristicId,
    written: (res) => xminOf('point_exclusions', res.body.id),
  },
  'DELETE /api/v1/characteristics/:id/exclusions/:lotId': {
    role: 'quality_manager',
    send: (h) => request(app).delete(`/api/v1/characteristics/${f.t.characteristicId}/exclusions/${f.lotId.T4}`).set(h).send({ reason: 'The retest confirmed the first value' }),
    status: 200,
    entity: 'characteristic',
    action: 'include point',
    entityId: () => f.t.characteristicId,
    written: (res) => xminOf('point_exclusions', res.body.id),
  },
  'POST /api/v1/characteristics/:id/limit-revisions': {
    role: 'quality_manager',
    send: (h) => request(app).post(`/api/v1/characteristics/${f.t.characteristicId}/limit-revisions`).set(h).send({ baselineFrom: testDay(0), baselineTo: testDay(20), reason: 'Process stable over the baseline' }),
    status: 201,
    entity: 'characteristic',
    action: 'freeze limits',
    entityId: () => f.t.characteristicId,
    written: (res) => xminOf('control_limit_revisions', res.body.id),
  },
  'POST /api/v1/characteristics/:id/spec-revisions': {
    role: 'quality_manager',
    send: (h) => request(app).post(`/api/v1/characteristics/${f.t.characteristicId}/spec-revisions`).set(h).send({ lsl: 136, usl: 154, target: 145, reason: 'Customer agreement, revision 2' }),
    status: 201,
    entity: 'characteristic',
    action: 'revise specification',
    entityId: () => f.t.characteristicId,
    written: (res) => xminOf('spec_limits', res.body.id),
  },
  'POST /api/v1/spc-runs': {
    role: 'quality_manager',
    // A characteristic id that no record has: the run holds nothing, so no job of the test server's workers
    // writes its row after this request (a run of a real characteristic is theirs to update at once).
    send: (h) => request(app).post('/api/v1/spc-runs').set(h).send({ characteristicIds: [2_147_483_647] }),
    status: 202,
    entity: 'spc run',
    action: 'start',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('spc_runs', res.body.id),
  },
  'PATCH /api/v1/alarms/:id': {
    role: 'quality_manager',
    send: (h) => request(app).patch(`/api/v1/alarms/${f.alarmIds[0]}`).set(h).send({ status: 'acknowledged', note: 'Seen, checking the press' }),
    status: 200,
    entity: 'alarm',
    action: 'acknowledge',
    entityId: () => f.alarmIds[0],
    written: () => xminOf('alarms', f.alarmIds[0]),
  },
  'POST /api/v1/alarms/:id/comments': {
    role: 'quality_manager',
    send: (h) => request(app).post(`/api/v1/alarms/${f.alarmIds[0]}/comments`).set(h).send({ body: 'The press was calibrated on Monday' }),
    status: 201,
    entity: 'alarm',
    action: 'comment',
    entityId: () => f.alarmIds[0],
    written: () => newestOf('alarm_comments', 'alarm_id', f.alarmIds[0]),
  },
  'POST /api/v1/alarms/acknowledge': {
    role: 'quality_manager',
    send: (h) => request(app).post('/api/v1/alarms/acknowledge').set(h).send({ ids: [f.alarmIds[1]], note: 'Seen at the morning meeting' }),
    status: 200,
    entity: 'alarm',
    action: 'acknowledge',
    entityId: () => f.alarmIds[1],
    written: () => xminOf('alarms', f.alarmIds[1]),
  },
  'POST /api/v1/alarm-groups': {
    role: 'quality_manager',
    send: (h) => request(app).post('/api/v1/alarm-groups').set(h).send({ title: 'One cause: the new sand', alarmIds: [f.alarmIds[2]] }),
    status: 201,
    entity: 'alarm group',
    action: 'create',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('alarm_groups', res.body.id),
  },
  'POST /api/v1/subscriptions': {
    role: 'technician',
    send: (h) => request(app).post('/api/v1/subscriptions').set(h).send({ productId: f.t.productId, immediate: true, digest: false }),
    status: 201,
    entity: 'alarm subscription',
    action: 'subscribe',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('alarm_subscriptions', res.body.id),
  },
  'PATCH /api/v1/subscriptions/:id': {
    role: 'technician',
    send: (h) => request(app).patch(`/api/v1/subscriptions/${f.subscriptionToChange}`).set(h).send({ digest: true }),
    status: 200,
    entity: 'alarm subscription',
    action: 'update',
    entityId: () => f.subscriptionToChange,
    written: () => xminOf('alarm_subscriptions', f.subscriptionToChange),
  },
  'DELETE /api/v1/subscriptions/:id': {
    role: 'quality_manager',
    send: (h) => request(app).delete(`/api/v1/subscriptions/${f.subscriptionToDelete}`).set(h),
    status: 204,
    entity: 'alarm subscription',
    action: 'unsubscribe',
    entityId: () => f.subscriptionToDelete,
    written: null,
  },
  'POST /api/v1/ncrs': {
    role: 'technician',
    send: (h) =>
      request(app)
        .post('/api/v1/ncrs')
        .set(h)
        .send({ title: 'Flow low on a coverage lot', description: 'Flow diameter below the lower limit on one lot.', severity: 'minor', lots: [{ lotNumber: f.u.lotNumber('U1') }] }),
    status: 201,
    entity: 'ncr',
    action: 'raise',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('ncrs', res.body.id),
  },
  'PATCH /api/v1/ncrs/:id': {
    role: 'quality_manager',
    send: (h) => request(app).patch(`/api/v1/ncrs/${f.ncrId}`).set(h).send({ title: 'Flow low on two coverage lots' }),
    status: 200,
    entity: 'ncr',
    action: 'update',
    entityId: () => f.ncrId,
    written: () => xminOf('ncrs', f.ncrId),
  },
  'POST /api/v1/ncrs/:id/transitions': {
    role: 'quality_manager',
    send: (h) => request(app).post(`/api/v1/ncrs/${f.ncrId}/transitions`).set(h).send({ to: 'investigating' }),
    status: 200,
    entity: 'ncr',
    action: 'transition',
    entityId: () => f.ncrId,
    written: () => xminOf('ncrs', f.ncrId),
  },
  'POST /api/v1/ncrs/:id/actions': {
    role: 'quality_manager',
    send: (h) => request(app).post(`/api/v1/ncrs/${f.ncrId}/actions`).set(h).send({ kind: 'preventive', description: 'Check the sand moisture each shift', ownerId: f.ids.technician, dueDate: '2099-01-31' }),
    status: 201,
    entity: 'ncr',
    action: 'add action',
    entityId: () => f.ncrId,
    written: () => newestOf('ncr_actions', 'ncr_id', f.ncrId),
  },
  'PATCH /api/v1/ncrs/:id/actions/:actionId': {
    role: 'technician',
    send: (h) => request(app).patch(`/api/v1/ncrs/${f.ncrId}/actions/${f.actionId}`).set(h).send({ evidence: 'Scale recalibrated, certificate filed' }),
    status: 200,
    entity: 'ncr',
    action: 'update action',
    entityId: () => f.ncrId,
    written: () => xminOf('ncr_actions', f.actionId),
  },
  'POST /api/v1/ncrs/:id/attachments': {
    role: 'technician',
    send: (h) => request(app).post(`/api/v1/ncrs/${f.ncrId}/attachments`).set(h).attach('file', Buffer.from('lot,flow_mm\nU1,131\n'), 'retest.csv'),
    status: 201,
    entity: 'ncr',
    action: 'attach file',
    entityId: () => f.ncrId,
    written: () => newestOf('ncr_attachments', 'ncr_id', f.ncrId),
  },
  'POST /api/v1/process-events': {
    role: 'technician',
    send: (h) => request(app).post('/api/v1/process-events').set(h).send({ occurredAt: testDay(30), title: 'New sand source', productCode: f.t.productCode }),
    status: 201,
    entity: 'process event',
    action: 'record event',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('process_events', res.body.id),
  },
  'PATCH /api/v1/plants/:id': {
    role: 'admin',
    // A plant of this file's own, so the demo plant's date format never changes under another test.
    send: async (h) => {
      const made = await db.execute<{ id: number }>(sql`insert into plants (code, name, time_zone) values (${prefix}, 'Coverage plant', 'Europe/London') returning id`);
      f.plantId = made.rows[0].id;
      createdPlants.push(f.plantId);
      return request(app).patch(`/api/v1/plants/${f.plantId}`).set(h).send({ dateFormat: 'yyyy-MM-dd' });
    },
    status: 200,
    entity: 'plant',
    action: 'update',
    entityId: () => f.plantId,
    written: () => xminOf('plants', f.plantId),
  },
  'POST /api/v1/lines': {
    role: 'admin',
    send: (h) => request(app).post('/api/v1/lines').set(h).send({ code: kit.newCode('L'), name: 'Line 9 · coverage' }),
    status: 201,
    entity: 'production line',
    action: 'create',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('production_lines', res.body.id),
  },
  'PATCH /api/v1/lines/:id': {
    role: 'admin',
    send: (h) => request(app).patch(`/api/v1/lines/${f.line.id}`).set(h).send({ name: 'Line 9 · renamed' }),
    status: 200,
    entity: 'production line',
    action: 'update',
    entityId: () => f.line.id,
    written: () => xminOf('production_lines', f.line.id),
  },
  'POST /api/v1/products': {
    role: 'admin',
    send: (h) => request(app).post('/api/v1/products').set(h).send({ code: kit.newCode('P'), name: 'HV Coverage Render', family: 'render', declaredClass: 'GP CS II', lineCode: 'L1' }),
    status: 201,
    entity: 'product',
    action: 'create',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('products', res.body.id),
  },
  'PATCH /api/v1/products/:id': {
    role: 'admin',
    send: (h) => request(app).patch(`/api/v1/products/${f.product.id}`).set(h).send({ name: 'HV Coverage Render Light' }),
    status: 200,
    entity: 'product',
    action: 'update',
    entityId: () => f.product.id,
    written: () => xminOf('products', f.product.id),
  },
  'POST /api/v1/characteristics': {
    role: 'admin',
    send: (h) => request(app).post('/api/v1/characteristics').set(h).send(kit.rc28(f.product.code, { code: `${f.product.code}-RC28B` })),
    status: 201,
    entity: 'characteristic',
    action: 'create',
    entityId: (res) => res.body.id,
    written: (res) => xminOf('characteristics', res.body.id),
  },
  'PATCH /api/v1/characteristics/:id': {
    role: 'admin',
    send: (h) => request(app).patch(`/api/v1/characteristics/${f.characteristicId}`).set(h).send({ name: 'HV Coverage Render · compressive strength · 28 days' }),
    status: 200,
    entity: 'characteristic',
    action: 'update',
    entityId: () => f.characteristicId,
    written: () => xminOf('characteristics', f.characteristicId),
  },
  'POST /api/v1/lots/:lotNumber/hold': {
    role: 'technician',
    send: (h) => request(app).post(`/api/v1/lots/${f.u.lotNumber('U8')}/hold`).set(h).send({ reason: 'Bag weights out of tolerance' }),
    status: 200,
    entity: 'lot',
    action: 'hold',
    entityId: () => f.u.lotNumber('U8'),
    written: () => newestOf('lot_holds', 'lot_id', f.lotId.U8),
  },
  'POST /api/v1/lots/:lotNumber/release': {
    role: 'quality_manager',
    send: (h) => request(app).post(`/api/v1/lots/${f.u.lotNumber('U3')}/release`).set(h).send({ reason: 'Retest inside specification' }),
    status: 200,
    entity: 'lot',
    action: 'release',
    entityId: () => f.u.lotNumber('U3'),
    written: () => newestOf('lot_holds', 'lot_id', f.lotId.U3),
  },
};

const routes = writeRoutesOf(app);

beforeAll(async () => {
  const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 135, usl: 155, target: 145, effectiveFrom: '2024-12-01T00:00:00Z' }] });
  const u = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
  for (let i = 1; i <= 14; i++) await t.addLot(`T${i}`, testDay(i), testPair(i));
  for (let i = 1; i <= 8; i++) await u.addLot(`U${i}`, testDay(i), testPair(i));
  const found = await db.execute<{ lot_number: string; id: number }>(sql`select lot_number, id from lots where product_id in (${t.productId}, ${u.productId})`);
  const lotId = Object.fromEntries(found.rows.map((r) => [r.lot_number.slice(r.lot_number.lastIndexOf('-') + 1), r.id]));
  const ids = {
    technician: await userIdByEmail(db, demoEmail.technician),
    manager: await userIdByEmail(db, demoEmail.quality_manager),
    admin: await userIdByEmail(db, demoEmail.admin),
  };
  await excludePoint(db, { characteristicId: t.characteristicId, lotId: lotId.T4, reason: 'Mould not oiled', userId: ids.manager });

  const header = 'lot,product,line,produced_at,characteristic,value,replicate';
  const voidable = await importResults(db, {
    fileName: 'to-void.csv',
    content: Buffer.from(`${header}\n${u.lotNumber('UV')},${u.productCode},L1,${testDay(12)},${u.code},147,1\n`),
    actorId: ids.technician,
    source: 'upload',
  });
  if (voidable.kind !== 'imported' || voidable.uploadId === null) throw new Error(`the upload to void did not import: ${JSON.stringify(voidable)}`);
  const [measurement] = (await db.execute<{ id: number }>(sql`select id from measurements where lot_id = ${lotId.U2} order by id limit 1`)).rows;

  const alarmRows = await db.execute<{ id: number }>(sql`
    insert into alarms (characteristic_id, lot_id, rule, chart, point_index, statistic, "values", description, source)
    select ${u.characteristicId}, l, 'we1', 'location', 0, 160, array[160, 160]::float8[], 'coverage test alarm', 'test'
    from unnest(array[${lotId.U4}, ${lotId.U5}, ${lotId.U6}]::int[]) as l
    returning id`);

  const manager = await as('quality_manager');
  const technician = await as('technician');
  const admin = await as('admin');
  const ok = (res: Answer, status: number, what: string) => {
    if (res.status !== status) throw new Error(`${what}: ${res.status} ${JSON.stringify(res.body)}`);
    return res.body;
  };
  ok(await request(app).post(`/api/v1/lots/${u.lotNumber('U3')}/hold`).set(technician).send({ reason: 'Waiting for the retest' }), 200, 'hold to release');
  const ncr = ok(
    await request(app).post('/api/v1/ncrs').set(manager).send({ title: 'Coverage NCR', description: 'A record for the write routes to change.', severity: 'minor', lots: [{ lotNumber: u.lotNumber('U7') }] }),
    201,
    'NCR',
  );
  const withAction = ok(
    await request(app).post(`/api/v1/ncrs/${ncr.id}/actions`).set(manager).send({ kind: 'corrective', description: 'Recalibrate the dosing scale', ownerId: ids.technician, dueDate: '2099-01-31' }),
    201,
    'NCR action',
  );
  const toChange = ok(await request(app).post('/api/v1/subscriptions').set(technician).send({ productId: u.productId, immediate: true, digest: false }), 201, 'subscription');
  const toDelete = ok(await request(app).post('/api/v1/subscriptions').set(manager).send({ productId: u.productId, immediate: true, digest: true }), 201, 'subscription');
  const line = await kit.newLine();
  const product = await kit.newProduct();
  const characteristic = ok(await request(app).post('/api/v1/characteristics').set(admin).send(kit.rc28(product.code)), 201, 'characteristic');
  const user = ok(
    await request(app).post('/api/v1/users').set(admin).send({ email: `${prefix.toLowerCase()}-old@harrowvale.example`, name: 'Coverage Leaver', role: 'technician', password: 'a-long-enough-password' }),
    201,
    'user',
  );
  createdUsers.push(user.id);

  f = {
    t,
    u,
    lotId,
    ids,
    uploadToVoid: voidable.uploadId,
    measurementToCorrect: measurement.id,
    alarmIds: alarmRows.rows.map((r) => r.id),
    ncrId: ncr.id,
    actionId: withAction.actions[withAction.actions.length - 1].id,
    subscriptionToChange: toChange.id,
    subscriptionToDelete: toDelete.id,
    line,
    product,
    characteristicId: characteristic.id,
    userId: user.id,
    plantId: 0,
  };
}, 60_000);

afterAll(async () => {
  // A run started by the limits and exclusion recipes may still be at work on the test characteristic.
  for (let waited = 0; waited < 30_000; waited += 250) {
    const busy = await db.execute(sql`select 1 from spc_run_items where characteristic_id = ${f?.t.characteristicId ?? 0} and status in ('queued', 'running') limit 1`);
    if (!busy.rows.length) break;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  const groups = f ? await db.execute<{ id: number }>(sql`select distinct group_id as id from alarms where id = any(${sql.param(f.alarmIds)}::int[]) and group_id is not null`) : { rows: [] };
  await removeTestCharacteristics(db);
  if (groups.rows.length) await db.execute(sql`delete from alarm_groups where id = any(${sql.param(groups.rows.map((g) => g.id))}::int[])`);
  await removeCatalogueRecords(db, prefix);
  // Users stay (the trail names them) but can no longer sign in; mappings and plants of this file go.
  if (createdUsers.length) await db.execute(sql`update users set active = false where id = any(${sql.param(createdUsers)}::int[])`);
  if (createdMappings.length) await db.execute(sql`delete from column_mappings where id = any(${sql.param(createdMappings)}::int[])`);
  if (createdPlants.length) await db.execute(sql`delete from plants where id = any(${sql.param(createdPlants)}::int[])`);
  await queue.stop();
  await db.$client.end();
}, 60_000);

describe('the route table', () => {
  it('is read from the app: the walk finds routes of several routers, at their full paths', () => {
    expect(routes).toEqual(expect.arrayContaining(['POST /api/v1/ncrs', 'PATCH /api/v1/ncrs/:id/actions/:actionId', 'DELETE /api/v1/characteristics/:id/exclusions/:lotId', 'POST /api/v1/auth/logout']));
  });

  it('gives every write route a recipe or a written exemption', () => {
    expect(routes.filter((r) => !recipes[r] && !exemptions[r])).toEqual([]);
  });

  it('names only routes that exist, and none twice', () => {
    const named = [...Object.keys(recipes), ...Object.keys(exemptions), ...Object.keys(openToEveryRole)];
    expect(named.filter((r) => !routes.includes(r))).toEqual([]);
    expect(Object.keys(recipes).filter((r) => exemptions[r])).toEqual([]);
  });

  it('catches a write route added without a recipe', () => {
    const grown = createApp({ db, config: { jwtSecret: TEST_JWT_SECRET, loginAttemptsPer15Min: 50 }, serveWeb: false, spcQueue: queue });
    const extra = Router();
    extra.post('/:id/stamps', (_req, res) => void res.status(201).end());
    grown.use('/api/v1/forgotten', extra);
    expect(writeRoutesOf(grown).filter((r) => !recipes[r] && !exemptions[r])).toEqual(['POST /api/v1/forgotten/:id/stamps']);
  });
});

describe('every write leaves its audit event in its own transaction', () => {
  it.each(Object.keys(recipes))('%s', async (route) => {
    const recipe = recipes[route];
    const headers = await as(recipe.role);
    const actorId = (await request(app).get('/api/v1/auth/me').set(headers)).body.id as number;
    const [{ mark }] = (await db.execute<{ mark: number }>(sql`select coalesce(max(id), 0)::int as mark from audit_events`)).rows;
    const res = await recipe.send(headers);
    expect(res.status, `${route}: ${JSON.stringify(res.body)}`).toBe(recipe.status);
    const entityId = String(recipe.entityId(res, actorId));
    const events = await db.execute<{ seq: string | null; xmin: string }>(sql`
      select seq, xmin::text as xmin from audit_events
      where id > ${mark} and entity = ${recipe.entity} and action = ${recipe.action} and entity_id = ${entityId} and actor_id = ${actorId}`);
    expect(events.rows.length, `${route}: no ${recipe.entity} '${recipe.action}' event`).toBeGreaterThanOrEqual(1);
    // Sealed: the chain gives a row its place only when its transaction commits (migration 0016).
    expect(events.rows.filter((e) => e.seq === null)).toEqual([]);
    expect(new Set(events.rows.map((e) => e.xmin)).size).toBe(1);
    if (recipe.written) {
      const written = await db.execute<{ xmin: string }>(recipe.written(res));
      expect(written.rows[0]?.xmin, `${route}: the changed row and its audit event come from one transaction`).toBe(events.rows[0].xmin);
    }
  });
});

// The other side of the same rule: a request that changes nothing writes no row, so it owes no event.
describe('a write that changes nothing', () => {
  it('leaves the NCR row untouched and the trail without an event (PATCH with the title it has)', async () => {
    const xmin = async () => (await db.execute<{ xmin: string }>(xminOf('ncrs', f.ncrId))).rows[0].xmin;
    const before = await xmin();
    const [{ mark }] = (await db.execute<{ mark: number }>(sql`select coalesce(max(id), 0)::int as mark from audit_events`)).rows;
    const { title } = (await request(app).get(`/api/v1/ncrs/${f.ncrId}`).set(await as('auditor'))).body;
    expect((await request(app).patch(`/api/v1/ncrs/${f.ncrId}`).set(await as('quality_manager')).send({ title })).status).toBe(200);
    expect(await xmin()).toBe(before);
    expect((await db.execute(sql`select id from audit_events where id > ${mark} and entity = 'ncr' and entity_id = ${String(f.ncrId)}`)).rows).toEqual([]);
  });
});

// The auditor is read-only (/work/shared/product-brief.md, "The people and their day"): refused before any
// body or id is read, so any id and an empty body do.
describe('the auditor on every write route', () => {
  const refusable = routes.filter((r) => !openToEveryRole[r]);
  it.each(refusable)('%s answers 403', async (route) => {
    const [method, path] = route.split(' ');
    const url = path.replace(/:[A-Za-z]+/g, '1');
    const verb = method.toLowerCase() as 'post' | 'put' | 'patch' | 'delete';
    const res = await request(app)[verb](url).set(await as('auditor')).send({});
    expect(res.status).toBe(403);
    expect(res.body.error).toBe('Your role does not allow this action');
  });

  it('refuses on more routes than are open to everyone', () => {
    expect(refusable.length).toBeGreaterThan(30);
  });
});
