import { eq, max, min } from 'drizzle-orm';
import type { IngestCatalogue } from '@shared/ingest';
import { DEFAULT_PLANT_DATE_FORMAT, type PlantDateFormat } from '@shared/time';
import type { Database } from '../db/client';
import { characteristics, plants, productionLines, products, specLimits, testMethods } from '../db/schema';

export interface LoadedCatalogue extends IngestCatalogue {
  /** How the plant writes dates, for times in messages (shared/time). */
  dateFormat: PlantDateFormat;
  lineIds: Map<string, number>;
  productIds: Map<string, number>;
  characteristicIds: Map<string, number>;
  /**
   * Per characteristic id, the highest lower and the lowest upper limit of any specification revision.
   * A lot's mean outside the revision in force needs a value beyond these, so only lots with such a
   * value (or with results stored before) are judged against the specification after an import.
   */
  strictestLimits: Map<number, { lsl: number | null; usl: number | null }>;
}

/** The plant's configuration as validation needs it: codes, subgroup sizes, physical ranges. */
export async function loadCatalogue(db: Pick<Database, 'select'>): Promise<LoadedCatalogue> {
  const [plant] = await db.select({ timeZone: plants.timeZone, dateFormat: plants.dateFormat }).from(plants).orderBy(plants.id).limit(1);
  const allLines = await db.select({ id: productionLines.id, code: productionLines.code, active: productionLines.active }).from(productionLines);
  const lineRows = allLines.filter((l) => l.active);
  const productRows = await db.select({ id: products.id, code: products.code, lineId: products.lineId }).from(products).where(eq(products.active, true));
  const allCharacteristics = await db
    .select({
      id: characteristics.id,
      code: characteristics.code,
      name: characteristics.name,
      unit: characteristics.unit,
      subgroupSize: characteristics.subgroupSize,
      productCode: products.code,
      physicalMin: testMethods.physicalMin,
      physicalMax: testMethods.physicalMax,
      physicalMaxExclusive: testMethods.physicalMaxExclusive,
      active: characteristics.active,
    })
    .from(characteristics)
    .innerJoin(products, eq(products.id, characteristics.productId))
    .innerJoin(testMethods, eq(testMethods.id, characteristics.testMethodId));
  // Deactivated ones are read too, so that a row naming one is told so rather than "unknown".
  const chRows = allCharacteristics.filter((c) => c.active);
  const limits = await db
    .select({ id: specLimits.characteristicId, lsl: max(specLimits.lsl), usl: min(specLimits.usl) })
    .from(specLimits)
    .groupBy(specLimits.characteristicId);
  const lineCodeOf = new Map(allLines.map((l) => [l.id, l.code]));
  return {
    timeZone: plant?.timeZone ?? 'UTC',
    dateFormat: plant?.dateFormat ?? DEFAULT_PLANT_DATE_FORMAT,
    lineCodes: new Set(lineRows.map((l) => l.code)),
    productCodes: new Set(productRows.map((p) => p.code)),
    // The catalogue ties a product to the one line that makes it (products.line_id), deactivated or not.
    productLines: new Map(productRows.flatMap((p) => (p.lineId === null || !lineCodeOf.has(p.lineId) ? [] : [[p.code, new Set([lineCodeOf.get(p.lineId)!])] as const]))),
    characteristics: new Map(chRows.map((c) => [c.code, c])),
    deactivatedCharacteristics: new Set(allCharacteristics.filter((c) => !c.active).map((c) => c.code)),
    lineIds: new Map(lineRows.map((l) => [l.code, l.id])),
    productIds: new Map(productRows.map((p) => [p.code, p.id])),
    characteristicIds: new Map(chRows.map((c) => [c.code, c.id])),
    strictestLimits: new Map(limits.map((l) => [l.id, { lsl: l.lsl, usl: l.usl }])),
  };
}
