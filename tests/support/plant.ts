// Invented test products and characteristics beside the demo plant, so that a test controls every
// value of its chart. Used by the SPC, alarm and reliability tests only.
import { eq, sql } from 'drizzle-orm';
import type { ChartType, RuleSetId } from '@shared/spc';
import type { Database } from '@api/db/client';
import { characteristics, plants, productionLines, products, specLimits, testMethods } from '@api/db/schema';
import { importResults, type Subgroup } from '@api/ingest/import';
import { createRunRecord } from '@api/spc/runs';

export interface TestCharacteristic {
  productId: number;
  productCode: string;
  lineId: number;
  characteristicId: number;
  code: string;
  /** Imports one lot's values through the one ingest path; returns the outcome's ids. */
  addLot(lot: string, producedAt: string, values: number[]): Promise<{ characteristicIds: number[]; measurementIds: number[]; toJudge: Subgroup[] }>;
  lotNumber(suffix: string): string;
}

let counter = 0;
/** What this test process created, so that it can leave the shared test database as it found it. */
const created = { products: [] as number[], characteristics: [] as number[] };

export async function createTestCharacteristic(
  db: Database,
  opts: {
    chartType: ChartType;
    subgroupSize: number;
    ruleSet?: RuleSetId;
    specs?: { lsl: number | null; usl: number | null; target?: number | null; effectiveFrom: string }[];
    lineCode?: string;
  },
): Promise<TestCharacteristic> {
  const tag = `${process.pid.toString(36)}${Date.now().toString(36)}${(++counter).toString(36)}`.toUpperCase();
  const productCode = `TP${tag}`;
  const [plant] = await db.select({ id: plants.id }).from(plants).orderBy(plants.id).limit(1);
  const [line] = await db.select({ id: productionLines.id, code: productionLines.code }).from(productionLines).where(eq(productionLines.code, opts.lineCode ?? 'L1'));
  const [method] = await db.select({ id: testMethods.id }).from(testMethods).where(eq(testMethods.code, 'FLOW'));
  const [product] = await db
    .insert(products)
    .values({ plantId: plant.id, code: productCode, name: `Test compound ${tag}`, family: 'levelling', lineId: line.id })
    .returning({ id: products.id });
  const code = `${productCode}-FLOW`;
  const [ch] = await db
    .insert(characteristics)
    .values({ code, productId: product.id, testMethodId: method.id, name: 'Flow diameter', unit: 'mm', subgroupSize: opts.subgroupSize, chartType: opts.chartType, ruleSet: opts.ruleSet ?? 'we' })
    .returning({ id: characteristics.id });
  created.products.push(product.id);
  created.characteristics.push(ch.id);
  if (opts.specs?.length) {
    await db.insert(specLimits).values(
      opts.specs.map((s, i) => ({ characteristicId: ch.id, revision: i + 1, lsl: s.lsl, usl: s.usl, target: s.target ?? null, effectiveFrom: new Date(s.effectiveFrom) })),
    );
  }
  return {
    productId: product.id,
    productCode,
    lineId: line.id,
    characteristicId: ch.id,
    code,
    lotNumber: (suffix) => `${productCode}-${suffix}`,
    async addLot(lot, producedAt, values) {
      const header = 'lot,product,line,produced_at,characteristic,value,replicate';
      const rows = values.map((v, i) => `${productCode}-${lot},${productCode},${line.code},${producedAt},${code},${v},${i + 1}`);
      const outcome = await importResults(db, { fileName: 'test.csv', content: Buffer.from(`${header}\n${rows.join('\n')}\n`), actorId: null, source: 'upload' });
      if (outcome.kind !== 'imported') throw new Error(`test lot did not import: ${JSON.stringify(outcome)}`);
      return outcome;
    },
  };
}

/** A production time `d` days after 1 January 2025, at `hour` UTC, in ISO 8601. */
export const testDay = (d: number, hour = 6) => new Date(Date.UTC(2025, 0, 1 + d, hour)).toISOString();
/** Deterministic pairs around 145 mm with ranges that vary from lot to lot. */
export const testPair = (i: number): number[] => [145 + ((i * 7) % 5) - 2, 145 + ((i * 3) % 7) - 3];

/** The demo quality manager's id, for audit rows. */
export async function userIdByEmail(db: Database, email: string): Promise<number> {
  const res = await db.execute<{ id: number }>(sql`select id from users where lower(email) = lower(${email})`);
  return res.rows[0].id;
}

/** A run with its items but no queue jobs, for tests that call runCharacteristic themselves. */
export const createRunRow = (db: Database, characteristicIds: number[]): Promise<number> =>
  createRunRecord(db, { kind: 'incremental', trigger: 'manual', characteristicIds });

/**
 * Deletes the test products of this process with everything that hangs on them, so that later test
 * files see the demo plant alone (their catalogue and overview checks count it). Audit rows,
 * uploads and sent mail stay, as they would in the plant.
 */
export async function removeTestCharacteristics(db: Database): Promise<void> {
  if (!created.products.length) return;
  const ch = sql.param([...created.characteristics]);
  const pr = sql.param([...created.products]);
  await db.transaction(async (tx) => {
    // NCRs that name a test lot or alarm go with them (their audit events stay, as the trail is append-only).
    const found = await tx.execute<{ ncr_id: number }>(sql`
      select ncr_id from ncr_alarms where alarm_id in (select id from alarms where characteristic_id = any(${ch}::int[]))
      union select ncr_id from ncr_lots where lot_id in (select id from lots where product_id = any(${pr}::int[]))`);
    const ncrIds = sql.param(found.rows.map((r) => r.ncr_id));
    await tx.execute(sql`delete from lot_holds where ncr_id = any(${ncrIds}::int[])`);
    for (const table of ['ncr_attachments', 'ncr_actions', 'ncr_alarms', 'ncr_lots']) await tx.execute(sql`delete from ${sql.identifier(table)} where ncr_id = any(${ncrIds}::int[])`);
    await tx.execute(sql`delete from ncrs where id = any(${ncrIds}::int[])`);
    await tx.execute(sql`delete from capability_watch where characteristic_id = any(${ch}::int[])`);
    await tx.execute(sql`delete from alarm_comments where alarm_id in (select id from alarms where characteristic_id = any(${ch}::int[]))`);
    await tx.execute(sql`delete from lot_holds where lot_id in (select id from lots where product_id = any(${pr}::int[])) or alarm_id in (select id from alarms where characteristic_id = any(${ch}::int[]))`);
    await tx.execute(sql`delete from alarms where characteristic_id = any(${ch}::int[])`);
    await tx.execute(sql`delete from spc_snapshots where characteristic_id = any(${ch}::int[])`);
    await tx.execute(sql`delete from spc_run_items where characteristic_id = any(${ch}::int[])`);
    await tx.execute(sql`delete from point_exclusions where characteristic_id = any(${ch}::int[])`);
    await tx.execute(sql`delete from control_limit_revisions where characteristic_id = any(${ch}::int[])`);
    await tx.execute(sql`delete from alarm_subscriptions where product_id = any(${pr}::int[])`);
    await tx.execute(sql`delete from measurements where characteristic_id = any(${ch}::int[]) or lot_id in (select id from lots where product_id = any(${pr}::int[]))`);
    await tx.execute(sql`delete from lots where product_id = any(${pr}::int[])`);
    await tx.execute(sql`delete from spec_limits where characteristic_id = any(${ch}::int[])`);
    await tx.execute(sql`delete from process_events where product_id = any(${pr}::int[])`);
    await tx.execute(sql`delete from characteristics where id = any(${ch}::int[])`);
    await tx.execute(sql`delete from products where id = any(${pr}::int[])`);
  });
  created.products.length = 0;
  created.characteristics.length = 0;
}
