import { asc, eq, sql, type SQLWrapper } from 'drizzle-orm';
import type { Database } from '../client';
import { characteristics, productionLines, products, testMethods } from '../schema';
import type { TestMethodCode } from '@shared/lab';
import type { CharacteristicView, LineView, ProductView, SpecInForce } from '@shared/schemas/catalogue';

type Reader = Pick<Database, 'select'>;

/**
 * Results were ever recorded under a characteristic, live or voided. Asked as two questions because
 * live and voided measurements each have an index that leads with the characteristic, and no index
 * holds both.
 */
export const hasRecordedResults = (characteristicId: SQLWrapper) =>
  sql<boolean>`(exists (select 1 from measurements m where m.characteristic_id = ${characteristicId} and m.voided_at is null)
             or exists (select 1 from measurements m where m.characteristic_id = ${characteristicId} and m.voided_at is not null))`;

/** Characteristics with product, test method and the specification revision in force now; one of them with `id`. */
export async function listCharacteristics(db: Reader, id?: number): Promise<CharacteristicView[]> {
  return db
    .select({
      id: characteristics.id,
      code: characteristics.code,
      name: characteristics.name,
      unit: characteristics.unit,
      ageDays: characteristics.ageDays,
      subgroupSize: characteristics.subgroupSize,
      chartType: characteristics.chartType,
      ruleSet: characteristics.ruleSet,
      samplingPlan: characteristics.samplingPlan,
      capabilityThreshold: characteristics.capabilityThreshold,
      active: characteristics.active,
      productId: products.id,
      productCode: products.code,
      productName: products.name,
      productFamily: products.family,
      lineCode: productionLines.code,
      // Stored as text; the rows are the method catalogue of shared/lab, written by the seed.
      testMethodCode: sql<TestMethodCode>`${testMethods.code}`,
      testMethodName: testMethods.name,
      standard: testMethods.standard,
      rawLoad: testMethods.rawLoad,
      decimals: testMethods.decimals,
      spec: sql<SpecInForce | null>`(
        select json_build_object('revision', s.revision, 'lsl', s.lsl, 'usl', s.usl, 'target', s.target, 'effectiveFrom', s.effective_from)
        from spec_limits s where s.characteristic_id = ${characteristics.id} and s.effective_from <= now()
        order by s.effective_from desc, s.revision desc limit 1)`,
      /** Results were ever recorded under it (voided ones too): its code, product, method and age are fixed. */
      hasResults: hasRecordedResults(characteristics.id),
    })
    .from(characteristics)
    .innerJoin(products, eq(products.id, characteristics.productId))
    .innerJoin(testMethods, eq(testMethods.id, characteristics.testMethodId))
    .leftJoin(productionLines, eq(productionLines.id, products.lineId))
    .where(id === undefined ? undefined : eq(characteristics.id, id))
    .orderBy(asc(products.code), asc(characteristics.id));
}

/** Products with their line; one of them with `id`. */
export async function listProducts(db: Reader, id?: number): Promise<ProductView[]> {
  return db
    .select({
      id: products.id,
      code: products.code,
      name: products.name,
      family: products.family,
      declaredClass: products.declaredClass,
      active: products.active,
      lineCode: productionLines.code,
      lineName: productionLines.name,
      /** Lots of it are recorded: its code is fixed. */
      hasLots: sql<boolean>`exists (select 1 from lots l where l.product_id = products.id)`,
    })
    .from(products)
    .leftJoin(productionLines, eq(productionLines.id, products.lineId))
    .where(id === undefined ? undefined : eq(products.id, id))
    .orderBy(asc(products.code));
}

/** Production lines; one of them with `id`. */
export async function listLines(db: Reader, id?: number): Promise<LineView[]> {
  return db
    .select({
      id: productionLines.id,
      code: productionLines.code,
      name: productionLines.name,
      active: productionLines.active,
      /** Lots were made on it: its code is fixed. */
      hasLots: sql<boolean>`exists (select 1 from lots l where l.line_id = production_lines.id)`,
    })
    .from(productionLines)
    .where(id === undefined ? undefined : eq(productionLines.id, id))
    .orderBy(asc(productionLines.code));
}
