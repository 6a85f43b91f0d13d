// An invented plant of any size for the reliability tests and the benchmark: products with lots in
// production order and one or more values per lot and characteristic, generated inside PostgreSQL.
// Values are normal-looking (sum of uniforms) around 145 mm, with a planted step of 50 lots (a sand
// source that was soon changed back) at nine tenths of the history.
import { sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { ensureReferenceData } from '@api/db/seed';

export interface ScaledPlant {
  plantId: number;
  characteristicIds: number[];
  productIds: number[];
}

export async function seedScaledPlant(db: Database, opts: { characteristics: number; points: number; perProduct?: number; subgroupSize?: number; seed?: number }): Promise<ScaledPlant> {
  await ensureReferenceData(db);
  const perProduct = opts.perProduct ?? 10;
  const n = opts.subgroupSize ?? 1;
  const products = Math.ceil(opts.characteristics / perProduct);
  return db.transaction(async (tx) => {
    await tx.execute(sql`select setseed(${opts.seed ?? 0.42})`);
    const plant = await tx.execute<{ id: number }>(sql`
      insert into plants (code, name, time_zone) values ('SCALE', 'Harrow Vale Mortar Works (scaled test copy)', 'Europe/London') returning id`);
    const plantId = plant.rows[0].id;
    const line = await tx.execute<{ id: number }>(sql`insert into production_lines (plant_id, code, name) values (${plantId}, 'S1', 'Scaled line') returning id`);
    const lineId = line.rows[0].id;
    const productRows = await tx.execute<{ id: number }>(sql`
      insert into products (plant_id, code, name, family, line_id)
      select ${plantId}, 'SC' || lpad(g::text, 3, '0'), 'Scaled compound ' || g, 'levelling', ${lineId} from generate_series(1, ${products}) g
      returning id`);
    const productIds = productRows.rows.map((r) => r.id);
    const chRows = await tx.execute<{ id: number }>(sql`
      insert into characteristics (code, product_id, test_method_id, name, unit, subgroup_size, chart_type)
      select 'SC' || lpad(((g - 1) / ${perProduct} + 1)::text, 3, '0') || '-C' || lpad(g::text, 3, '0'),
             (select id from products where code = 'SC' || lpad(((g - 1) / ${perProduct} + 1)::text, 3, '0')),
             (select id from test_methods where code = 'FLOW'), 'Flow diameter ' || g, 'mm', ${n}, ${n === 1 ? 'imr' : 'xbar-r'}::chart_type
      from generate_series(1, ${opts.characteristics}) g
      returning id`);
    const characteristicIds = chRows.rows.map((r) => r.id).sort((a, b) => a - b);
    await tx.execute(sql`
      insert into spec_limits (characteristic_id, revision, lsl, usl, target, effective_from)
      select id, 1, 133, 157, 145, '2020-01-01T00:00:00Z' from characteristics where id = any(${sql.param(characteristicIds)}::int[])`);
    await tx.execute(sql`
      insert into lots (lot_number, product_id, line_id, produced_at, shift)
      select p.code || '-' || lpad(g::text, 6, '0'), p.id, ${lineId}, timestamptz '2024-01-01T06:00:00Z' + (g * interval '2 hours'), 'early'
      from products p, generate_series(1, ${opts.points}) g where p.id = any(${sql.param(productIds)}::int[])`);
    await tx.execute(sql`
      insert into measurements (lot_id, characteristic_id, replicate, value, source)
      select l.id, c.id, r,
             round((145 + 2 * (random() + random() + random() + random() + random() + random() - 3)
                    + case when split_part(l.lot_number, '-', 2)::int between ${Math.floor(opts.points * 0.9)} and ${Math.floor(opts.points * 0.9) + 49} then 2.5 else 0 end)::numeric, 1)::float8,
             'upload'
      from characteristics c join lots l on l.product_id = c.product_id, generate_series(1, ${n}) r
      where c.id = any(${sql.param(characteristicIds)}::int[])`);
    return { plantId, characteristicIds, productIds };
  });
}
