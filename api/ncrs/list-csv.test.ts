// The audit pack's NCR list, read back with papaparse (an independent RFC 4180 reader), on the demo's NCRs.
import Papa from 'papaparse';
import { afterAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { databaseUrl } from '@tests/support/api';
import { createDatabase } from '@api/db/client';
import { ncrListCsv } from './list-csv';

const db = createDatabase(databaseUrl(), 2);
afterAll(() => db.$client.end());

describe('the NCR list of a product and period', () => {
  it('lists the NCRs open at any time in the period, with their lots and dispositions, in plant time', async () => {
    const [ncr] = (
      await db.execute<{ number: string; product_id: number; created_at: string; time_zone: string }>(sql`
        select n.number, coalesce(n.product_id, (select l.product_id from ncr_lots nl join lots l on l.id = nl.lot_id where nl.ncr_id = n.id limit 1)) as product_id,
               n.created_at, p.time_zone
        from ncrs n join plants p on p.id = n.plant_id where n.number like 'NCR-%-0003'`)
    ).rows;
    expect(ncr).toBeDefined();
    const raised = new Date(ncr.created_at);
    const { csv, count } = await ncrListCsv(db, { productId: ncr.product_id, from: new Date(raised.getTime() - 86_400_000), to: new Date(raised.getTime() + 86_400_000), timeZone: ncr.time_zone });
    expect(csv.startsWith('\uFEFF')).toBe(true);
    const rows = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true }).data;
    expect(rows).toHaveLength(count);
    const row = rows.find((r) => r.ncr === ncr.number)!;
    expect(row).toBeDefined();
    expect(row.status).toBe('Investigating');
    // ISO 8601 with the plant's offset, never a bare UTC time.
    expect(row.raised_at).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d[+-]\d\d:\d\d$/);
    expect(row.lots_and_dispositions).toMatch(/no decision yet/);

    // A period that ended before it was raised does not list it.
    const before = await ncrListCsv(db, { productId: ncr.product_id, from: new Date(raised.getTime() - 3 * 86_400_000), to: new Date(raised.getTime() - 2 * 86_400_000), timeZone: ncr.time_zone });
    expect(Papa.parse<Record<string, string>>(before.csv, { header: true, skipEmptyLines: true }).data.map((r) => r.ncr)).not.toContain(ncr.number);
  });
});
