// Lots and measurements keep their references by statement-level triggers (migration 0004) instead of
// declared foreign keys. These tests hold them to what a foreign key promises (PostgreSQL manual,
// "Constraints: Foreign Keys"): no row refers to a missing parent, no referenced parent disappears,
// and the same SQLSTATE 23503 (foreign_key_violation, PostgreSQL Appendix A) is raised.
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { databaseUrl } from '@tests/support/api';

const pool = new pg.Pool({ connectionString: databaseUrl(), max: 3 });
afterAll(() => pool.end());

const tag = `REF${process.pid}${Date.now() % 100_000}`;
let productId: number;
let lineId: number;
let characteristicId: number;

beforeAll(async () => {
  const ids = await pool.query<{ p: number; l: number; c: number }>(
    `select p.id as p, p.line_id as l, c.id as c from products p join characteristics c on c.product_id = p.id where c.code = 'HVL25-FLOW'`,
  );
  ({ p: productId, l: lineId, c: characteristicId } = ids.rows[0]);
});

async function newLot(suffix: string, id?: number): Promise<number> {
  const res = await pool.query<{ id: number }>(
    `insert into lots (id, lot_number, product_id, line_id, produced_at) values (coalesce($4, nextval('lots_id_seq')), $1, $2, $3, now()) returning id`,
    [`${tag}-${suffix}`, productId, lineId, id ?? null],
  );
  return res.rows[0].id;
}

const code = (p: Promise<unknown>) => p.then(() => 'ok', (e: { code?: string }) => e.code);

async function removeLot(id: number): Promise<void> {
  await pool.query('delete from measurements where lot_id = $1', [id]);
  await pool.query('delete from lots where id = $1', [id]);
}

describe('references of lots and measurements', () => {
  it('refuse a measurement of a lot, characteristic, upload or user that does not exist', async () => {
    const lot = await newLot('A');
    const insert = (l: number, c: number, upload: number | null, user: number | null) =>
      pool.query(`insert into measurements (lot_id, characteristic_id, replicate, value, source, upload_id, entered_by) values ($1, $2, 1, 146, 'manual', $3, $4)`, [l, c, upload, user]);
    expect(await code(insert(2_000_000_000, characteristicId, null, null))).toBe('23503');
    expect(await code(insert(lot, 2_000_000_000, null, null))).toBe('23503');
    expect(await code(insert(lot, characteristicId, 2_000_000_000, null))).toBe('23503');
    expect(await code(insert(lot, characteristicId, null, 2_000_000_000))).toBe('23503');
    expect(await code(insert(lot, characteristicId, null, null))).toBe('ok');
    expect(await code(pool.query('update measurements set lot_id = 2000000000 where lot_id = $1', [lot]))).toBe('23503');
    await removeLot(lot);
  });

  it('find a missing lot inside a run of consecutive lot ids, the case checked by one range count', async () => {
    // Ids of our own choosing, far above the sequence, so that other tests' lots cannot fall between.
    const base = 1_500_000_000 + (process.pid % 10_000) * 10;
    const [a, b, c] = [await newLot('E1', base), await newLot('E2', base + 1), await newLot('E3', base + 2)];
    await pool.query('delete from lots where id = $1', [b]);
    const insert = (ids: number[]) =>
      pool.query(`insert into measurements (lot_id, characteristic_id, replicate, value, source) select unnest($1::int[]), $2, 1, 146, 'manual'`, [ids, characteristicId]);
    expect(await code(insert([a, a + 1, c]))).toBe('23503');
    expect(await code(insert([a, c]))).toBe('ok');
    await removeLot(a);
    await removeLot(c);
  });

  it('refuse a lot of a product or line that does not exist', async () => {
    const insert = (p: number, l: number) => pool.query(`insert into lots (lot_number, product_id, line_id, produced_at) values ($1, $2, $3, now())`, [`${tag}-B`, p, l]);
    expect(await code(insert(2_000_000_000, lineId))).toBe('23503');
    expect(await code(insert(productId, 2_000_000_000))).toBe('23503');
  });

  it('keep a lot that has measurements, and its id, but let an unreferenced lot go', async () => {
    const lot = await newLot('C');
    await pool.query(`insert into measurements (lot_id, characteristic_id, replicate, value, source) values ($1, $2, 1, 146, 'manual')`, [lot, characteristicId]);
    expect(await code(pool.query('delete from lots where id = $1', [lot]))).toBe('23503');
    expect(await code(pool.query('update lots set id = id + 1000000000 where id = $1', [lot]))).toBe('23503');
    await pool.query('delete from measurements where lot_id = $1', [lot]);
    expect(await code(pool.query('delete from lots where id = $1', [lot]))).toBe('ok');
  });

  it('make a lot removed while a measurement of it is being stored wait, then refuse', async () => {
    const lot = await newLot('D');
    const writer = await pool.connect();
    const remover = await pool.connect();
    try {
      await writer.query('begin');
      await writer.query(`insert into measurements (lot_id, characteristic_id, replicate, value, source) values ($1, $2, 1, 146, 'manual')`, [lot, characteristicId]);
      let settled = false;
      const removal = code(remover.query('delete from lots where id = $1', [lot])).finally(() => (settled = true));
      await new Promise((r) => setTimeout(r, 300));
      // The remover cannot decide while the insert is uncommitted: it waits for it.
      expect(settled).toBe(false);
      await writer.query('commit');
      expect(await removal).toBe('23503');
      expect((await pool.query('select 1 from lots where id = $1', [lot])).rowCount).toBe(1);
    } finally {
      writer.release();
      remover.release();
      await removeLot(lot);
    }
  });
});
