import type { IngestCatalogue } from '@shared/ingest';
import type { TestMethodEntry } from '@web/lib/test-methods';
import type { EntryCatalogue } from '@web/lib/catalogue';

/** The catalogue as the shared row validation needs it, built like the server builds it: active lines, products and characteristics only. */
export function ingestCatalogue({ timeZone, products, lines, characteristics, testMethods }: EntryCatalogue): IngestCatalogue {
  const ranges = new Map<string, TestMethodEntry['physicalRange']>(testMethods.map((m) => [m.code, m.physicalRange]));
  return {
    timeZone,
    lineCodes: new Set(lines.filter((l) => l.active).map((l) => l.code)),
    productCodes: new Set(products.filter((p) => p.active).map((p) => p.code)),
    // A product's line, as the catalogue records it: rows of the product from another line are refused.
    productLines: new Map(products.flatMap((p) => (p.active && p.lineCode ? [[p.code, new Set([p.lineCode])] as const] : []))),
    characteristics: new Map(
      characteristics.flatMap((c) => {
        const range = ranges.get(c.testMethodCode);
        if (!c.active || !range) return [];
        const entry = { productCode: c.productCode, name: c.name, unit: c.unit, subgroupSize: c.subgroupSize, physicalMin: range.min, physicalMax: range.max, physicalMaxExclusive: range.maxExclusive };
        return [[c.code, entry] as const];
      }),
    ),
    deactivatedCharacteristics: new Set(characteristics.filter((c) => !c.active).map((c) => c.code)),
  };
}
