import { asc, eq, sql } from 'drizzle-orm';
import type { Database } from '../client';
import { characteristics, productionLines, products, testMethods } from '../schema';

/** Characteristics with product, test method and the specification revision in force now. */
export async function listCharacteristics(db: Database) {
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
      active: characteristics.active,
      productId: products.id,
      productCode: products.code,
      productName: products.name,
      productFamily: products.family,
      lineCode: productionLines.code,
      testMethodCode: testMethods.code,
      testMethodName: testMethods.name,
      standard: testMethods.standard,
      rawLoad: testMethods.rawLoad,
      decimals: testMethods.decimals,
      spec: sql<{ revision: number; lsl: number | null; usl: number | null; target: number | null; effectiveFrom: string } | null>`(
        select json_build_object('revision', s.revision, 'lsl', s.lsl, 'usl', s.usl, 'target', s.target, 'effectiveFrom', s.effective_from)
        from spec_limits s where s.characteristic_id = ${characteristics.id} and s.effective_from <= now()
        order by s.effective_from desc, s.revision desc limit 1)`,
    })
    .from(characteristics)
    .innerJoin(products, eq(products.id, characteristics.productId))
    .innerJoin(testMethods, eq(testMethods.id, characteristics.testMethodId))
    .leftJoin(productionLines, eq(productionLines.id, products.lineId))
    .orderBy(asc(products.code), asc(characteristics.id));
}

export async function listProducts(db: Database) {
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
    })
    .from(products)
    .leftJoin(productionLines, eq(productionLines.id, products.lineId))
    .orderBy(asc(products.code));
}
