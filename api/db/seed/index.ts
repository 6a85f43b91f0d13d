import bcrypt from 'bcryptjs';
import { eq, sql } from 'drizzle-orm';
import { testMethods as methodCatalogue } from '@shared/lab';
import type { Role } from '@shared/schemas/users';
import type { Database } from '../client';
import { characteristics, plants, processEvents, productionLines, products, specLimits, testMethods, users } from '../schema';
import { recordAudit } from '../audit';
import { withStoryDating } from '../audit-chain';
import { importResults } from '@api/ingest/import';
import { recordManagerDecisions } from './decisions';
import { dateDemoDetections, queueFirstMorningDigest, subscribeDemoManager } from './alarm-story';
import { decidedAt } from './story-time';
import { recordQualityStory } from './quality-story';
import * as scenario from './scenario';

/** The demo sign-ins printed in the README. Demo mode only. */
export const DEMO_PASSWORD = 'prismline-demo';
export const demoUsers: { email: string; name: string; role: Role }[] = [
  { email: 'admin@harrowvale.example', name: 'Demo Administrator', role: 'admin' },
  { email: 'manager@harrowvale.example', name: 'Demo Quality Manager', role: 'quality_manager' },
  { email: 'technician@harrowvale.example', name: 'Demo Technician', role: 'technician' },
  { email: 'auditor@harrowvale.example', name: 'Demo Auditor', role: 'auditor' },
];

/** The test-method catalogue of shared/lab is reference data: kept in step on every start. */
export async function ensureReferenceData(db: Database): Promise<void> {
  for (const m of methodCatalogue) {
    const values = {
      code: m.code,
      name: m.name,
      standard: m.standard,
      unit: m.unit,
      state: m.state,
      physicalMin: m.physicalRange.min,
      physicalMax: m.physicalRange.max,
      physicalMaxExclusive: m.physicalRange.maxExclusive,
      decimals: m.decimals,
      rawLoad: m.rawLoad,
    };
    await db.insert(testMethods).values(values).onConflictDoUpdate({ target: testMethods.code, set: values });
  }
}

/** Where the demo history ends: the last 06:00 UTC not after now, so no lot lies in the future and a reseed the same day rebuilds the same data. */
export function demoEndDate(now = new Date()): Date {
  const today = Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate(), 6);
  return new Date(today <= now.getTime() ? today : today - 86_400_000);
}

/**
 * Seeds the invented Harrow Vale plant when the database is empty, with the quality manager's
 * decisions on its history (decisions.ts); never touches existing data. `publicUrl` goes into the
 * links of any alarm e-mail the seed's SPC runs send. Answers whether it seeded the plant now.
 */
export async function seedDemo(db: Database, opts: { publicUrl: string; now?: Date }): Promise<boolean> {
  const now = opts.now ?? new Date();
  await ensureReferenceData(db);
  const [{ count }] = await db.select({ count: sql<number>`count(*)::int` }).from(users);
  if (count === 0) {
    const passwordHash = await bcrypt.hash(DEMO_PASSWORD, 10);
    await db.insert(users).values(demoUsers.map((u) => ({ ...u, passwordHash })));
  }
  const [existingPlant] = await db.select({ id: plants.id }).from(plants).limit(1);
  if (existingPlant) return false;
  // The story's decisions are dated when the story has them happen, then the audit chain is sealed again.
  await withStoryDating(db, () => seedPlant(db, now, opts.publicUrl));
  return true;
}

/** The plant, its catalogue, six months of results and the quality manager's history of decisions. */
async function seedPlant(db: Database, now: Date, publicUrl: string): Promise<void> {
  const endDate = demoEndDate(now);
  const months = 6;
  const [admin] = await db.select({ id: users.id }).from(users).where(eq(users.email, demoUsers[0].email));
  const [manager] = await db.select({ id: users.id }).from(users).where(eq(users.email, demoUsers[1].email));
  const [technician] = await db.select({ id: users.id }).from(users).where(eq(users.email, demoUsers[2].email));
  const recorder = { quality_manager: manager.id, technician: technician.id };
  // The quality manager issued the specifications from the product data sheets before the history begins.
  const specificationsIssued = new Date(scenario.specificationIssuedAt(endDate.getTime()));

  await db.transaction(async (tx) => {
    const [plant] = await tx.insert(plants).values({ code: scenario.plant.code, name: scenario.plant.name, timeZone: scenario.plant.timeZone }).returning();
    const lineRows = await tx
      .insert(productionLines)
      .values(scenario.lines.map((l) => ({ plantId: plant.id, code: l.code, name: l.name })))
      .returning();
    const lineId = new Map(lineRows.map((l) => [l.code, l.id]));
    const productRows = await tx
      .insert(products)
      .values(scenario.products.map((p) => ({ plantId: plant.id, code: p.code, name: p.name, family: p.family, declaredClass: p.declaredClass, lineId: lineId.get(p.lineCode)! })))
      .returning();
    const productId = new Map(productRows.map((p) => [p.code, p.id]));
    const methodRows = await tx.select({ id: testMethods.id, code: testMethods.code }).from(testMethods);
    const methodId = new Map(methodRows.map((m) => [m.code, m.id]));
    const chRows = await tx
      .insert(characteristics)
      .values(
        scenario.characteristics.map((c) => ({
          code: c.code,
          productId: productId.get(c.productCode)!,
          testMethodId: methodId.get(c.testMethodCode)!,
          ageDays: c.ageDays,
          name: c.name,
          unit: c.unit,
          subgroupSize: c.replicates,
          chartType: c.chartType,
          ruleSet: c.ruleSet,
          samplingPlan: c.samplingPlan,
        })),
      )
      .returning();
    const chId = new Map(chRows.map((c) => [c.code, c.id]));
    await decidedAt(tx, specificationsIssued, async () => {
      const rows = await tx
        .insert(specLimits)
        .values(
          scenario.characteristics.map((c) => ({
            characteristicId: chId.get(c.code)!,
            revision: 1,
            lsl: c.spec.lsl ?? null,
            usl: c.spec.usl ?? null,
            target: c.spec.target ?? null,
            effectiveFrom: specificationsIssued,
            reason: 'Initial specification from the product data sheet',
            createdBy: manager.id,
            createdAt: specificationsIssued,
          })),
        )
        .returning();
      await recordAudit(
        tx,
        rows.map((r) => ({ actorId: manager.id, action: 'revise specification', entity: 'characteristic', entityId: r.characteristicId, after: { revision: r.revision, lsl: r.lsl, usl: r.usl, target: r.target, effectiveFrom: r.effectiveFrom }, reason: r.reason }) as const),
      );
    });
    // Each process event is in the log from the moment it happened, written by the person on hand.
    for (const e of scenario.processEventsFor({ endDate, months })) {
      const at = new Date(e.at);
      await decidedAt(tx, at, async () => {
        const [row] = await tx
          .insert(processEvents)
          .values({
            plantId: plant.id,
            lineId: e.lineCode ? lineId.get(e.lineCode)! : null,
            productId: e.productCode ? productId.get(e.productCode)! : null,
            occurredAt: at,
            title: e.title,
            description: e.description,
            createdBy: recorder[e.recordedBy],
            createdAt: at,
          })
          .returning();
        await recordAudit(tx, { actorId: row.createdBy, action: 'record event', entity: 'process event', entityId: row.id, after: { title: row.title, occurredAt: row.occurredAt, lineCode: e.lineCode, productCode: e.productCode ?? null } });
      });
    }
  });

  await subscribeDemoManager(db, manager.id);
  const csv = scenario.toCanonicalCsv(scenario.generateDemoResults({ endDate, months }));
  const outcome = await importResults(db, { fileName: 'harrow-vale-history.csv', content: Buffer.from(csv), actorId: admin?.id ?? null, source: 'upload' });
  if (outcome.kind !== 'imported') {
    throw new Error(`The demo history did not import: ${outcome.kind === 'rejected' ? JSON.stringify(outcome.errors.slice(0, 3)) : outcome.kind}`);
  }
  await recordManagerDecisions(db, { endDate, months, managerId: manager.id, publicUrl });
  await dateDemoDetections(db, now);
  await recordQualityStory(db, { endDate, months, managerId: manager.id, technicianId: technician.id });
  await queueFirstMorningDigest(db, { endDate, publicUrl });
}
