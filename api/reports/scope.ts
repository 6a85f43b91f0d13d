// What a capability report covers: the plant, the product, its characteristics (all active ones, or the
// ones asked for) and the period as plant days, turned into the production-time window the chart reads.
import { sql } from 'drizzle-orm';
import { addDays } from 'date-fns';
import { tz } from '@date-fns/tz';
import type { Database } from '@api/db/client';
import { fieldError, notFound } from '@api/http/errors';
import type { CapabilityReportQuery } from '@shared/schemas/reports';
import { readPlantDate, type PlantClock, type PlantDateFormat } from '@shared/time';

type Executor = Pick<Database, 'execute'>;

export interface ReportScope {
  plant: { id: number; name: string; clock: PlantClock };
  product: { id: number; code: string; name: string };
  /** In the order the report shows them: by code. */
  characteristics: { id: number; code: string; name: string }[];
  /** Plant days from–to (YYYY-MM-DD, inclusive) and the instants they stand for: from the first day's start to the last day's end. */
  period: { from: string; to: string; fromInstant: Date; toInstant: Date };
}

type ProductRow = { id: number; code: string; name: string; plant_id: number; plant_name: string; time_zone: string; date_format: PlantDateFormat };

/** Reads the scope of a report; an unknown characteristic or product is a 404, a characteristic of another product a 400. */
export async function resolveReportScope(db: Executor, query: CapabilityReportQuery): Promise<ReportScope> {
  const productOf = query.characteristic !== undefined ? sql`(select product_id from characteristics where id = ${query.characteristic})` : sql`${query.product}`;
  const [product] = (
    await db.execute<ProductRow>(sql`
      select p.id, p.code, p.name, p.plant_id, pl.name as plant_name, pl.time_zone, pl.date_format
      from products p join plants pl on pl.id = p.plant_id
      where p.id = ${productOf}`)
  ).rows;
  if (!product) throw query.characteristic !== undefined ? notFound(`Characteristic ${query.characteristic}`) : notFound(`Product ${query.product}`);

  const wanted = query.characteristic !== undefined ? [query.characteristic] : (query.characteristics ?? null);
  const rows = (
    await db.execute<{ id: number; code: string; name: string }>(sql`
      select id, code, name from characteristics
      where product_id = ${product.id}
        and ${wanted ? sql`id = any(${sql.param(wanted)}::int[])` : sql`active`}
      order by code collate "C"`)
  ).rows;
  if (wanted && rows.length !== wanted.length) {
    const missing = wanted.filter((id) => !rows.some((r) => r.id === id));
    throw fieldError('characteristics', `Characteristic ${missing.join(', ')} is not one of ${product.code}'s characteristics`);
  }

  const clock: PlantClock = { timeZone: product.time_zone, dateFormat: product.date_format };
  return {
    plant: { id: product.plant_id, name: product.plant_name, clock },
    product: { id: product.id, code: product.code, name: product.name },
    characteristics: rows.map((r) => ({ id: r.id, code: r.code, name: r.name })),
    period: { from: query.from, to: query.to, ...periodInstants(query.from, query.to, product.time_zone) },
  };
}

/** The instants plant days from–to stand for: the first day's start to the last millisecond of the last day (the chart's `to` is inclusive). */
export function periodInstants(from: string, to: string, timeZone: string): { fromInstant: Date; toInstant: Date } {
  const iso = { timeZone, dateFormat: 'yyyy-MM-dd' } as const;
  const start = readPlantDate(from, iso)!;
  const lastDay = readPlantDate(to, iso)!;
  const nextDay = addDays(lastDay, 1, { in: tz(timeZone) });
  return { fromInstant: start, toInstant: new Date(nextDay.getTime() - 1) };
}
