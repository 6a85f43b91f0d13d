// The one path by which results enter the database: CSV uploads, manual entry and the demo seed.
// All or nothing: a file with one bad row stores no measurement, only the rejected upload as evidence.
//
// A file is read piece by piece (shared/ingest/read.ts) and its checked rows gathered into rounds.
// While parsing goes on, one round is compared with what is stored over a second connection and encoded
// for COPY, and the one before it goes to PostgreSQL by COPY in the transaction, so the server never
// holds the whole file as objects and the transaction's connection never waits for parsing. The first
// bad row stops the storing; the rest of the file is still checked so the 422 names every row to
// correct, and the transaction rolls back.
import { drizzle } from 'drizzle-orm/node-postgres';
import type pg from 'pg';
import { decodeText, readResults, validateRows, type CanonicalRow, type ColumnMapping, type CsvDialect, type RowError, type ValidMeasurement } from '@shared/ingest';
import { beyondStrictestLimits } from '@shared/spc';
import { DEFAULT_PLANT_DATE_FORMAT, formatPlantDateTime, type PlantDateFormat } from '@shared/time';
import type { Database } from '@api/db/client';
import * as schema from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { fileFingerprint, putFile } from '@api/files/store';
import { loadCatalogue, type LoadedCatalogue } from './catalogue';
import { BinaryCopyWriter } from './copy-binary';
import { type EncodedRound, type LotEntry, ROWS_PER_STORE, Round, byCharacteristic, copyRound, lookUpRound, storedReadings } from './rounds';

/** One lot's results for one characteristic: a point of its chart. */
export interface Subgroup {
  lotId: number;
  characteristicId: number;
}

export type ImportOutcome =
  | {
      kind: 'imported';
      uploadId: number | null;
      rowsImported: number;
      characteristicIds: number[];
      measurementIds: number[];
      /** The lots and characteristics whose result may now be outside the specification: judged after the import. */
      toJudge: Subgroup[];
    }
  | { kind: 'rejected'; uploadId: number | null; rowsTotal: number; errors: RowError[] }
  | { kind: 'duplicate-file'; uploadId: number; /** When the same bytes came before, as the plant's clock read then. */ uploadedAt: string };

/** Serialises imports so duplicate checks and inserts see one consistent state. */
const IMPORT_LOCK = 727_002;
/** Characters parsed in one go before the event loop takes the database's answers. */
const PIECE_CHARACTERS = 128 * 1024;
/** The first round is short, so the first COPY starts early. */
const FIRST_ROUND_ROWS = 2_000;
/** Rounds handed to the database but not yet stored before parsing waits for it. */
const MAX_STORES_AHEAD = 2;

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
  /** When the rows are checked (epoch ms): times later than this and the allowance are refused. The clock's now when absent. */
  now?: number;
}

/** Validates everything, then stores every measurement in one transaction, or nothing. */
export async function importResults(db: Database, req: ImportRequest): Promise<ImportOutcome> {
  const sha256 = req.content ? fileFingerprint(req.content) : null;
  const client = await db.$client.connect();
  // A file's lookups of stored lots go over a second connection while the first is busy with COPY;
  // taken before the import lock, so an import holding the lock never waits for a connection.
  let reader: pg.PoolClient | undefined;
  let broken: Error | undefined;
  try {
    reader = req.content ? await db.$client.connect() : client;
    return await importOn(client, reader, req, sha256);
  } catch (err) {
    broken = err as Error;
    await client.query('rollback').then(
      () => (broken = undefined),
      () => undefined,
    );
    throw err;
  } finally {
    client.release(broken);
    if (reader && reader !== client) reader.release();
  }
}

async function importOn(client: pg.PoolClient, reader: pg.PoolClient, req: ImportRequest, sha256: string | null): Promise<ImportOutcome> {
  const tx = drizzle(client, { schema });
  await client.query('begin');
  await client.query('select pg_advisory_xact_lock($1)', [IMPORT_LOCK]);
  // The upload's id and its file's are taken first, so rows can be encoded with them before their own rows are stored.
  let uploadId: number | null = null;
  let fileId = 0;
  if (sha256) {
    const earlier = await client.query<{ id: number; uploaded_at: Date; time_zone: string | null; date_format: PlantDateFormat | null }>(
      `select u.id, u.uploaded_at, p.time_zone, p.date_format from uploads u left join (select time_zone, date_format from plants order by id limit 1) p on true
       where u.sha256 = $1 and u.status <> 'rejected'`,
      [sha256],
    );
    const seen = earlier.rows[0];
    if (seen) {
      await client.query('rollback');
      const clock = { timeZone: seen.time_zone ?? 'UTC', dateFormat: seen.date_format ?? DEFAULT_PLANT_DATE_FORMAT };
      return { kind: 'duplicate-file', uploadId: seen.id, uploadedAt: formatPlantDateTime(seen.uploaded_at, clock) };
    }
    const ids = await client.query<{ id: number; file_id: number }>(
      `select nextval(pg_get_serial_sequence('uploads', 'id'))::int as id, nextval(pg_get_serial_sequence('stored_files', 'id'))::int as file_id`,
    );
    uploadId = ids.rows[0].id;
    fileId = ids.rows[0].file_id;
  }
  const catalogue = await loadCatalogue(tx);
  // One "now" for the whole file, so every row is held to the same latest time.
  const now = req.now ?? Date.now();

  // The file's bytes go in first, while the first piece is parsed; counts are set once all is stored.
  // Every later statement on the transaction's connection waits for it: node-postgres takes one query
  // at a time, and queueing more behind a running one is deprecated (pg 8) and refused from pg 9.
  const fileKept = uploadId !== null ? insertUpload(client, req, sha256!, uploadId, fileId, 'imported', 0, 0, null) : Promise.resolve();
  fileKept.catch(() => undefined);

  const store = new MeasurementStore(client, reader, catalogue, req, uploadId);
  let rowsTotal: number;
  let readErrors: RowError[];
  if (req.rows) {
    const { valid, errors } = validateRows(req.rows, catalogue, { decimalComma: req.decimalComma ?? false, now });
    rowsTotal = req.rows.length;
    readErrors = errors;
    for (const v of valid) store.take(v);
    await store.store(await store.prepare(store.closeRound(), errors.length > 0));
  } else {
    const reading = readResults(decodeText(req.content ?? Buffer.alloc(0)), { dialect: req.dialect, mapping: req.mapping, catalogue, pieceSize: PIECE_CHARACTERS, now });
    readErrors = reading.errors;
    // Two chains: lookups of round k + 1 on the reading connection overlap the COPY of round k.
    let looked: Promise<unknown> = Promise.resolve();
    // The first COPY of rows follows the file's own statements on the connection.
    let stored: Promise<void> = fileKept;
    /** Each submitted round's end of storing, oldest first, to wait on when parsing runs ahead. */
    const storing: Promise<unknown>[] = [];
    let ahead = 0;
    let submitted = 0;
    let databaseFailed = false;
    const submit = () => {
      const round = store.closeRound();
      const failedSoFar = readErrors.length > 0;
      ahead++;
      submitted++;
      const prepared = looked.then(() => store.prepare(round, failedSoFar));
      looked = prepared;
      stored = Promise.all([stored, prepared])
        .then(([, ready]) => store.store(ready))
        .finally(() => ahead--);
      storing.push(stored.catch(() => undefined));
      // Handled here so a failure between pieces is no unhandled rejection; awaited below all the same.
      looked.catch(() => (databaseFailed = true));
      stored.catch(() => (databaseFailed = true));
    };
    try {
      for (const piece of reading.batches) {
        if (databaseFailed) break;
        // A short first round gets the database working while the rest of the file is parsed.
        for (const v of piece) if (store.take(v) >= (submitted === 0 ? FIRST_ROUND_ROWS : ROWS_PER_STORE)) submit();
        // Small pieces keep each stretch of parsing short, so the database's answers are taken up at once
        // and the next COPY starts while parsing goes on. When the database falls behind, wait for its
        // oldest round only, so it always has the next round ready.
        if (ahead <= MAX_STORES_AHEAD) await new Promise((resolve) => setImmediate(resolve));
        while (ahead > MAX_STORES_AHEAD) await storing.shift();
      }
      if (store.roundLength > 0) submit();
      await stored;
    } finally {
      // No lookup may still be running on the reading connection when it goes back to the pool.
      await looked.catch(() => undefined);
    }
    rowsTotal = reading.rowsTotal;
  }

  const errors = [...readErrors, ...store.errors].sort((a, b) => a.row - b.row);
  if (errors.length) {
    await fileKept.catch(() => undefined);
    await client.query('rollback');
    // The rejected file is kept under the id taken for it: the rollback did not give the id back. Its audit
    // event commits with it; the row errors themselves stay on the upload (bounded there), not in the trail.
    if (uploadId !== null) {
      await client.query('begin');
      await insertUpload(client, req, sha256!, uploadId, fileId, 'rejected', rowsTotal, 0, errors);
      await recordAudit(tx, {
        actorId: req.actorId,
        entity: 'upload',
        action: 'reject',
        entityId: uploadId,
        after: { fileName: req.fileName, rowsTotal, rowsRejected: new Set(errors.map((e) => e.row)).size },
      });
      await client.query('commit');
    }
    return { kind: 'rejected', uploadId, rowsTotal, errors };
  }

  await fileKept;
  if (uploadId !== null) await client.query('update uploads set rows_total = $2, rows_imported = $3 where id = $1', [uploadId, rowsTotal, store.rowsImported]);
  await recordAudit(tx, {
    actorId: req.actorId,
    ...(req.source === 'upload' ? ({ entity: 'upload', action: 'import' } as const) : ({ entity: 'measurement', action: 'manual entry' } as const)),
    entityId: uploadId ?? store.measurementIds[0],
    after: { fileName: req.fileName, rowsImported: store.rowsImported, lots: store.lotsTouched },
  });
  await client.query('commit');
  return {
    kind: 'imported',
    uploadId,
    rowsImported: store.rowsImported,
    characteristicIds: [...store.characteristicIds],
    measurementIds: store.measurementIds,
    toJudge: store.toJudge,
  };
}

/** Stores the upload's file, then its row, which refers to the file. */
async function insertUpload(client: pg.PoolClient, req: ImportRequest, sha256: string, id: number, fileId: number, status: 'imported' | 'rejected', rowsTotal: number, rowsImported: number, errors: RowError[] | null): Promise<void> {
  const content = req.content!;
  await putFile(client, { id: fileId, fileName: req.fileName, bytes: content, createdBy: req.actorId, sha256 });
  await client.query(
    `insert into uploads (id, file_name, sha256, uploaded_by, status, format, rows_total, rows_imported, rows_rejected, errors, size_bytes, file_id)
     values ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12)`,
    [id, req.fileName, sha256, req.actorId, status, req.mapping?.format ?? 'long', rowsTotal, rowsImported, errors ? new Set(errors.map((e) => e.row)).size : 0, errors ? JSON.stringify(errors) : null, content.length, fileId],
  );
}

/** Stores checked measurements round by round, after comparing each round with what is stored. */
class MeasurementStore {
  readonly errors: RowError[] = [];
  readonly measurementIds: number[] = [];
  readonly characteristicIds = new Set<number>();
  readonly toJudge: Subgroup[] = [];
  rowsImported = 0;
  lotsTouched = 0;
  private readonly lots = new Map<string, LotEntry>();
  private readonly judgeKeys = new Set<string>();
  /** Operator names and notes repeat down a file: one string each instead of one a row. */
  private readonly texts = new Map<string, string>();
  private readonly codes: Map<number, string>;
  private round = new Round();
  private failed = false;

  constructor(
    private readonly client: pg.PoolClient,
    /** Reads what other imports committed; under the import lock nothing else adds lots or measurements. */
    private readonly reader: pg.PoolClient,
    private readonly cat: LoadedCatalogue,
    private readonly req: ImportRequest,
    private readonly uploadId: number | null,
  ) {
    this.codes = new Map([...cat.characteristicIds].map(([code, id]) => [id, code]));
  }

  get roundLength(): number {
    return this.round.length;
  }

  private shared(text: string | null): string | null {
    if (text === null) return null;
    const known = this.texts.get(text);
    if (known !== undefined) return known;
    if (this.texts.size < 10_000) this.texts.set(text, text);
    return text;
  }

  /** Adds a checked row to the open round; returns the round's length. */
  take(v: ValidMeasurement): number {
    let lot = this.lots.get(v.lot);
    if (!lot) {
      lot = {
        number: v.lot,
        productId: this.cat.productIds.get(v.product)!,
        lineId: this.cat.lineIds.get(v.line)!,
        producedAt: v.producedAt,
        shift: this.shared(v.shift),
        row: v.row,
        id: 0,
        stored: false,
        clash: false,
      };
      this.lots.set(v.lot, lot);
      this.round.newLots.push(lot);
    }
    const r = this.round;
    const i = r.length++;
    r.lot.push(lot);
    r.characteristicId[i] = this.cat.characteristicIds.get(v.characteristic)!;
    r.replicate[i] = v.replicate;
    r.row[i] = v.row;
    r.value[i] = v.value;
    r.testedAt[i] = v.testedAt ?? NaN;
    r.operator.push(this.shared(v.operator));
    r.note.push(this.shared(v.note));
    return r.length;
  }

  /** The open round, to be prepared and stored; a new one opens. */
  closeRound(): Round {
    const closed = this.round;
    this.round = new Round();
    return closed;
  }

  /**
   * Compares a round with the stored lots and measurements and gives ids to its new lots and
   * measurements, then encodes it for COPY. Rounds are prepared in file order, so a lot is looked up
   * once, in its first round.
   */
  async prepare(round: Round, fileHasErrors: boolean): Promise<EncodedRound> {
    if (fileHasErrors) this.failed = true;
    const { stored, lotIds, measurementIds } = await lookUpRound(
      this.reader,
      round.newLots.map((l) => l.number),
      this.failed ? 0 : round.newLots.length,
      this.failed ? 0 : round.length,
    );
    const storedByNumber = new Map(stored.map((s) => [s.n, s]));
    let nextLotId = 0;
    for (const lot of round.newLots) {
      const s = storedByNumber.get(lot.number);
      if (!s) {
        lot.id = lotIds[nextLotId++] ?? 0;
        continue;
      }
      lot.id = s.id;
      lot.stored = true;
      lot.clash = true;
      if (s.p !== lot.productId || s.l !== lot.lineId) {
        this.errors.push({ row: lot.row, column: 'lot', message: `Lot ${lot.number} is already recorded for another product or line` });
      } else if (Math.abs(s.t - lot.producedAt) >= 60_000) {
        this.errors.push({ row: lot.row, column: 'produced_at', message: `Lot ${lot.number} is already recorded as produced at ${formatPlantDateTime(s.t, this.cat)} (plant time)` });
      } else lot.clash = false;
    }
    this.lotsTouched += round.newLots.length;

    // Readings this round gives for lots stored before: does the database hold any of them already?
    const onStored: number[] = [];
    for (let i = 0; i < round.length; i++) if (round.lot[i].stored && !round.lot[i].clash) onStored.push(i);
    if (onStored.length) {
      const already = await storedReadings(
        this.reader,
        onStored.map((i) => round.lot[i].id),
        onStored.map((i) => round.characteristicId[i]),
        onStored.map((i) => round.replicate[i]),
      );
      for (const i of already) {
        const at = onStored[i - 1];
        const code = this.codes.get(round.characteristicId[at]);
        this.errors.push({
          row: round.row[at],
          column: 'replicate',
          message: `Duplicate: ${code} replicate ${round.replicate[at]} of lot ${round.lot[at].number} is already stored; correct a stored value through an edit with a reason`,
        });
      }
    }
    if (this.errors.length) this.failed = true;
    return this.failed ? { rows: 0, lots: null, measurements: null } : this.encode(round, measurementIds);
  }

  /**
   * The round as COPY data, made while the database still stores the round before, so the
   * transaction's connection never waits for Node to encode.
   */
  private encode(round: Round, ids: number[]): EncodedRound {
    const uploadId = this.uploadId;
    const added = round.newLots.filter((l) => !l.stored);
    let lots: Buffer | null = null;
    if (added.length) {
      const lotRows = new BinaryCopyWriter(added.length * 80);
      for (const l of added) lotRows.row(6).int4(l.id).text(l.number).int4(l.productId).int4(l.lineId).timestamptz(l.producedAt).text(l.shift);
      lots = lotRows.finish();
    }
    const rows = new BinaryCopyWriter(round.length * 110);
    const order = byCharacteristic(round);
    for (let k = 0; k < round.length; k++) {
      const i = order[k];
      const lot = round.lot[i];
      const characteristicId = round.characteristicId[i];
      const value = round.value[i];
      const testedAt = round.testedAt[i];
      rows
        .row(11)
        .int4(ids[k])
        .int4(lot.id)
        .int4(characteristicId)
        .int4(round.replicate[i])
        .float8(value)
        .timestamptz(Number.isNaN(testedAt) ? null : testedAt)
        .text(round.operator[i])
        .text(round.note[i])
        .text(this.req.source);
      if (uploadId === null) rows.null();
      else rows.int4(uploadId);
      if (this.req.actorId === null) rows.null();
      else rows.int4(this.req.actorId);
      this.measurementIds.push(ids[k]);
      this.characteristicIds.add(characteristicId);
      if (beyondStrictestLimits(value, this.cat.strictestLimits.get(characteristicId)) || lot.stored) {
        const key = `${lot.id}:${characteristicId}`;
        if (!this.judgeKeys.has(key)) {
          this.judgeKeys.add(key);
          this.toJudge.push({ lotId: lot.id, characteristicId });
        }
      }
    }
    return { rows: round.length, lots, measurements: rows.finish() };
  }

  /** Stores an encoded round by COPY in the import's transaction, unless anything failed so far. */
  async store(round: EncodedRound): Promise<void> {
    if (this.failed || round.measurements === null || round.rows === 0) return;
    await copyRound(this.client, round.lots, round.measurements);
    this.rowsImported += round.rows;
  }
}
