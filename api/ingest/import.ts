// The one path by which results enter the database: CSV uploads, manual entry and the demo seed.
// All or nothing: a file with one bad row stores no measurement, only the rejected upload as evidence.
import { createHash } from 'node:crypto';
import { eq, ne, and, sql } from 'drizzle-orm';
import {
  applyMapping,
  decodeText,
  fileErrors,
  parseCsv,
  validateRows,
  type CanonicalRow,
  type ColumnMapping,
  type CsvDialect,
  type RowError,
  type ValidMeasurement,
} from '../../shared/ingest';
import type { Database } from '../db/client';
import { uploads } from '../db/schema';
import { arr } from '../db/sql';
import { recordAudit } from '../db/audit';
import { loadCatalogue, type LoadedCatalogue } from './catalogue';

export type ImportOutcome =
  | { kind: 'imported'; uploadId: number | null; rowsImported: number; characteristicIds: number[]; measurementIds: number[] }
  | { kind: 'rejected'; uploadId: number | null; rowsTotal: number; errors: RowError[] }
  | { kind: 'duplicate-file'; uploadId: number; uploadedAt: Date };

/** Serialises imports so duplicate checks and inserts see one consistent state. */
const IMPORT_LOCK = 727_002;
const BATCH = 20_000;

export interface ImportRequest {
  /** Original file name, or a label such as "manual entry". */
  fileName: string;
  /** Kept byte for byte. Absent for manual entry, which has no file. */
  content?: Buffer;
  actorId: number | null;
  source: 'upload' | 'manual';
  mapping?: ColumnMapping;
  /** Delimiter and decimal mark as the person uploading saw them in the preview; detected where absent. */
  dialect?: Partial<CsvDialect>;
  /** Rows already in canonical form (manual entry); content is not parsed then. */
  rows?: CanonicalRow[];
  decimalComma?: boolean;
}

/** Validates everything, then stores every measurement in one transaction, or nothing. */
export async function importResults(db: Database, req: ImportRequest): Promise<ImportOutcome> {
  const sha256 = req.content ? createHash('sha256').update(req.content).digest('hex') : null;
  const mapping: ColumnMapping = req.mapping ?? { format: 'long', columns: {} };

  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${IMPORT_LOCK})`);
    if (sha256) {
      const [earlier] = await tx
        .select({ id: uploads.id, uploadedAt: uploads.uploadedAt })
        .from(uploads)
        .where(and(eq(uploads.sha256, sha256), ne(uploads.status, 'rejected')));
      if (earlier) return { kind: 'duplicate-file', uploadId: earlier.id, uploadedAt: earlier.uploadedAt } as const;
    }

    let rows = req.rows;
    let decimalComma = req.decimalComma ?? false;
    let fileLevel: RowError[] = [];
    let rowsTotal = rows?.length ?? 0;
    if (!rows) {
      const text = decodeText(req.content ?? Buffer.alloc(0));
      const parsed = parseCsv(text, req.dialect);
      decimalComma = parsed.decimalComma;
      rowsTotal = parsed.records.length;
      fileLevel = fileErrors(text, parsed, mapping);
      rows = fileLevel.length ? [] : applyMapping(parsed.records, mapping);
    }

    const catalogue = await loadCatalogue(tx);
    const { valid, errors } = validateRows(rows, catalogue, { decimalComma });
    errors.unshift(...fileLevel);
    if (!errors.length) errors.push(...(await storedConflicts(tx, valid, catalogue)));

    if (errors.length) {
      errors.sort((a, b) => a.row - b.row);
      const uploadId = req.content ? await saveUpload(tx, req, sha256!, 'rejected', rowsTotal, 0, errors) : null;
      return { kind: 'rejected', uploadId, rowsTotal, errors } as const;
    }

    const uploadId = req.content ? await saveUpload(tx, req, sha256!, 'imported', rowsTotal, valid.length, null) : null;
    const lotIds = await upsertLots(tx, valid, catalogue);
    const measurementIds = await insertMeasurements(tx, valid, lotIds, catalogue, uploadId, req);
    await recordAudit(tx, {
      actorId: req.actorId,
      action: req.source === 'upload' ? 'import' : 'manual entry',
      entity: req.source === 'upload' ? 'upload' : 'measurement',
      entityId: uploadId ?? measurementIds[0],
      after: { fileName: req.fileName, rowsImported: valid.length, lots: lotIds.size },
    });
    const characteristicIds = [...new Set(valid.map((v) => catalogue.characteristicIds.get(v.characteristic)!))];
    return { kind: 'imported', uploadId, rowsImported: valid.length, characteristicIds, measurementIds } as const;
  });
}

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0];

async function saveUpload(tx: Tx, req: ImportRequest, sha256: string, status: 'imported' | 'rejected', rowsTotal: number, rowsImported: number, errors: RowError[] | null) {
  const [row] = await tx
    .insert(uploads)
    .values({
      fileName: req.fileName,
      sha256,
      uploadedBy: req.actorId,
      status,
      format: req.mapping?.format ?? 'long',
      rowsTotal,
      rowsImported,
      rowsRejected: errors ? new Set(errors.map((e) => e.row)).size : 0,
      errors,
      content: req.content!,
    })
    .returning({ id: uploads.id });
  return row.id;
}

/** Rows that clash with what is stored: a lot recorded differently, or a measurement already there. */
async function storedConflicts(tx: Tx, valid: ValidMeasurement[], cat: LoadedCatalogue): Promise<RowError[]> {
  const errors: RowError[] = [];
  const lotNumbers = [...new Set(valid.map((v) => v.lot))];
  const existing = new Map<string, { id: number; productId: number; lineId: number; producedAt: Date }>();
  for (let i = 0; i < lotNumbers.length; i += BATCH) {
    const chunk = lotNumbers.slice(i, i + BATCH);
    const res = await tx.execute<{ id: number; lot_number: string; product_id: number; line_id: number; produced_at: Date }>(
      sql`select id, lot_number, product_id, line_id, produced_at from lots where lot_number = any(${arr(chunk)}::text[])`,
    );
    for (const r of res.rows) existing.set(r.lot_number, { id: r.id, productId: r.product_id, lineId: r.line_id, producedAt: new Date(r.produced_at) });
  }
  const reported = new Set<string>();
  for (const v of valid) {
    const lot = existing.get(v.lot);
    if (!lot || reported.has(v.lot)) continue;
    if (lot.productId !== cat.productIds.get(v.product) || lot.lineId !== cat.lineIds.get(v.line)) {
      errors.push({ row: v.row, column: 'lot', message: `Lot ${v.lot} is already recorded for another product or line` });
      reported.add(v.lot);
    } else if (Math.abs(lot.producedAt.getTime() - v.producedAt) >= 60_000) {
      errors.push({ row: v.row, column: 'produced_at', message: `Lot ${v.lot} is already recorded as produced at ${lot.producedAt.toISOString()}` });
      reported.add(v.lot);
    }
  }
  if (existing.size === 0) return errors;

  const candidates = valid.filter((v) => existing.has(v.lot));
  for (let i = 0; i < candidates.length; i += BATCH) {
    const chunk = candidates.slice(i, i + BATCH);
    const res = await tx.execute<{ idx: number }>(sql`
      select k.idx from unnest(${arr(chunk.map((v) => existing.get(v.lot)!.id))}::int[], ${arr(chunk.map((v) => cat.characteristicIds.get(v.characteristic)!))}::int[],
                              ${arr(chunk.map((v) => v.replicate))}::int[], ${arr(chunk.map((_, j) => j))}::int[]) as k(lot_id, characteristic_id, replicate, idx)
      join measurements m on m.lot_id = k.lot_id and m.characteristic_id = k.characteristic_id and m.replicate = k.replicate and m.voided_at is null`);
    for (const r of res.rows) {
      const v = chunk[r.idx];
      errors.push({
        row: v.row,
        column: 'replicate',
        message: `Duplicate: ${v.characteristic} replicate ${v.replicate} of lot ${v.lot} is already stored; correct a stored value through an edit with a reason`,
      });
    }
  }
  return errors;
}

async function upsertLots(tx: Tx, valid: ValidMeasurement[], cat: LoadedCatalogue): Promise<Map<string, number>> {
  const firstByLot = new Map<string, ValidMeasurement>();
  for (const v of valid) if (!firstByLot.has(v.lot)) firstByLot.set(v.lot, v);
  const lots = [...firstByLot.values()];
  const ids = new Map<string, number>();
  for (let i = 0; i < lots.length; i += BATCH) {
    const chunk = lots.slice(i, i + BATCH);
    // New lots come back from the insert; the second select sees the snapshot before it, so only lots stored earlier.
    const res = await tx.execute<{ id: number; lot_number: string }>(sql`
      with added as (
        insert into lots (lot_number, product_id, line_id, produced_at, shift)
        select * from unnest(${arr(chunk.map((l) => l.lot))}::text[], ${arr(chunk.map((l) => cat.productIds.get(l.product)!))}::int[],
                             ${arr(chunk.map((l) => cat.lineIds.get(l.line)!))}::int[], ${arr(chunk.map((l) => new Date(l.producedAt).toISOString()))}::timestamptz[],
                             ${arr(chunk.map((l) => l.shift))}::text[])
        on conflict (lot_number) do nothing
        returning id, lot_number)
      select id, lot_number from added
      union all
      select id, lot_number from lots where lot_number = any(${arr(chunk.map((l) => l.lot))}::text[])`);
    for (const r of res.rows) ids.set(r.lot_number, r.id);
  }
  return ids;
}

async function insertMeasurements(tx: Tx, valid: ValidMeasurement[], lotIds: Map<string, number>, cat: LoadedCatalogue, uploadId: number | null, req: ImportRequest): Promise<number[]> {
  const ids: number[] = [];
  for (let i = 0; i < valid.length; i += BATCH) {
    const c = valid.slice(i, i + BATCH);
    const res = await tx.execute<{ id: number }>(sql`
      insert into measurements (lot_id, characteristic_id, replicate, value, tested_at, operator, note, source, upload_id, entered_by)
      select lot_id, characteristic_id, replicate, value, tested_at, operator, note, ${req.source}::measurement_source, ${uploadId}::int, ${req.actorId}::int
      from unnest(${arr(c.map((v) => lotIds.get(v.lot)!))}::int[], ${arr(c.map((v) => cat.characteristicIds.get(v.characteristic)!))}::int[],
                  ${arr(c.map((v) => v.replicate))}::int[], ${arr(c.map((v) => v.value))}::float8[],
                  ${arr(c.map((v) => (v.testedAt === null ? null : new Date(v.testedAt).toISOString())))}::timestamptz[],
                  ${arr(c.map((v) => v.operator))}::text[], ${arr(c.map((v) => v.note))}::text[])
           as u(lot_id, characteristic_id, replicate, value, tested_at, operator, note)
      returning id`);
    ids.push(...res.rows.map((r) => r.id));
  }
  return ids;
}
