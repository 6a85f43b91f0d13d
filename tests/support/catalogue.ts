// The catalogue tests (api/routes/{lines,products,characteristics}, tests/e2e/catalogue.test.ts) add
// lines, products and characteristics through the API as an administrator would, with the kit below.
// The product never deletes them; the tests do, so that the files after them see the demo plant alone
// (their catalogue and overview checks count it). Audit rows and uploads stay.
import request from 'supertest';
import { expect } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { auditEvents } from '@api/db/schema';
import type { Role } from '@shared/schemas/users';
import type { TestApi } from './api';

/** A code prefix unique to one test run, e.g. "ZK3F9Q": upper case, as codes are stored. */
export function testCodePrefix(letter: string): string {
  return `Z${letter}${Date.now().toString(36).toUpperCase()}`;
}

/**
 * Whether a code (or a label that starts with one) belongs to the demo plant rather than to a catalogue
 * test: test files run side by side, so a file that counts the plant's lines or products may see another
 * file's records (codes from testCodePrefix, all starting with "Z") before that file removes them.
 */
export const isDemoCode = (code: string): boolean => !code.startsWith('Z');

/** Deletes the lines, products and characteristics whose codes start with `prefix`, with what hangs on them. */
export async function removeCatalogueRecords(db: Database, prefix: string): Promise<void> {
  // An SPC job of another test may update the same run items meanwhile, locking them in another order:
  // PostgreSQL then ends one side with a deadlock (SQLSTATE 40P01), and the removal is tried again.
  for (let attempt = 1; ; attempt++) {
    try {
      return await removeOnce(db, prefix);
    } catch (err) {
      const { code, cause } = err as { code?: string; cause?: { code?: string } };
      if ((code ?? cause?.code) !== '40P01' || attempt === 5) throw err;
    }
  }
}

async function removeOnce(db: Database, prefix: string): Promise<void> {
  const like = `${prefix.replace(/[%_\\]/g, '\\$&')}%`;
  await db.transaction(async (tx) => {
    await tx.execute(sql`create temporary table doomed_products on commit drop as select id from products where code like ${like}`);
    await tx.execute(sql`create temporary table doomed_lines on commit drop as select id from production_lines where code like ${like}`);
    await tx.execute(sql`
      create temporary table doomed_characteristics on commit drop as
      select id from characteristics where code like ${like} or product_id in (select id from doomed_products)`);
    await tx.execute(sql`
      create temporary table doomed_lots on commit drop as
      select id from lots where product_id in (select id from doomed_products) or line_id in (select id from doomed_lines)`);
    await tx.execute(sql`
      delete from alarm_comments where alarm_id in (select id from alarms where characteristic_id in (select id from doomed_characteristics) or lot_id in (select id from doomed_lots))`);
    for (const table of ['capability_watch', 'alarms', 'spc_snapshots', 'spc_run_items', 'point_exclusions', 'control_limit_revisions', 'spec_limits']) {
      await tx.execute(sql`delete from ${sql.identifier(table)} where characteristic_id in (select id from doomed_characteristics)`);
    }
    await tx.execute(sql`delete from alarms where lot_id in (select id from doomed_lots)`);
    await tx.execute(sql`delete from point_exclusions where lot_id in (select id from doomed_lots)`);
    await tx.execute(sql`delete from measurements where characteristic_id in (select id from doomed_characteristics) or lot_id in (select id from doomed_lots)`);
    await tx.execute(sql`delete from lots where id in (select id from doomed_lots)`);
    await tx.execute(sql`delete from characteristics where id in (select id from doomed_characteristics)`);
    await tx.execute(sql`
      delete from alarm_subscriptions where product_id in (select id from doomed_products) or line_id in (select id from doomed_lines)`);
    await tx.execute(sql`
      delete from process_events where product_id in (select id from doomed_products) or line_id in (select id from doomed_lines)`);
    await tx.execute(sql`delete from products where id in (select id from doomed_products)`);
    await tx.execute(sql`delete from production_lines where id in (select id from doomed_lines)`);
  });
}

/**
 * What the lines, products and characteristics tests share: headers of a demo role, fresh codes of this
 * run, the audit trail of a record, and an administrator's new line, product or characteristic.
 */
export function catalogueTestKit(api: TestApi, prefix: string) {
  let counter = 0;
  const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });
  const admin = () => as('admin');
  /** A fresh code of this run, in lower case to show that codes are stored in upper case. */
  const newCode = (kind: string) => `${prefix}${kind}${++counter}`;

  async function auditOf(entity: string, id: number) {
    return api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, entity), eq(auditEvents.entityId, String(id)))).orderBy(auditEvents.id);
  }

  async function newLine(): Promise<{ id: number; code: string }> {
    const res = await request(api.app).post('/api/v1/lines').set(await admin()).send({ code: newCode('L'), name: 'Line 3 · renders' });
    expect(res.status).toBe(201);
    return res.body;
  }

  async function newProduct(lineCode = 'L1'): Promise<{ id: number; code: string }> {
    const res = await request(api.app).post('/api/v1/products').set(await admin()).send({ code: newCode('P'), name: 'HV Render Light', family: 'render', declaredClass: 'GP CS II', lineCode });
    expect(res.status).toBe(201);
    return res.body;
  }

  /** A compressive strength at 28 days on `productCode`, as EN 196-1 tests it (six prism halves by default). */
  const rc28 = (productCode: string, extra: Record<string, unknown> = {}) => ({
    code: `${productCode}-RC28`,
    name: 'HV Render Light · compressive strength · 28 d',
    productCode,
    testMethodCode: 'RC',
    ageDays: 28,
    subgroupSize: 6,
    chartType: 'xbar-r',
    ruleSet: 'we',
    ...extra,
  });

  async function newCharacteristic(body: Record<string, unknown>) {
    return request(api.app).post('/api/v1/characteristics').set(await admin()).send(body);
  }

  return { as, admin, newCode, auditOf, newLine, newProduct, rc28, newCharacteristic };
}

/** The roles that read the catalogue but may not change it ('catalogue.manage' is the administrator's). */
export const catalogueReaders = ['technician', 'quality_manager', 'auditor'] as const;
