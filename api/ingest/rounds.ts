// The import's rounds and their storage: checked rows gathered in columns, the lookups that compare a
// round with the stored lots and measurements and hand out new ids, and the COPY that stores it. The
// import (import.ts) decides what goes into a round and what is refused.
import { once } from 'node:events';
import type pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';

/** Checked rows gathered into one round of lookups and COPY statements. */
export const ROWS_PER_STORE = 10_000;

/** Ids handed out by a sequence in one statement: a gapless run, or the list itself. */
type IdBlock = { first: number; count: number; list: number[] | null } | null;
const idBlock = `json_build_object('first', min(id), 'count', count(*), 'list', case when max(id) - min(id) + 1 = count(*) then null else json_agg(id) end)`;
function idsOf(block: IdBlock): number[] {
  if (block === null || block.count === 0) return [];
  if (block.list) return block.list;
  const ids = new Array<number>(block.count);
  for (let i = 0; i < block.count; i++) ids[i] = block.first + i;
  return ids;
}

async function copyIn(client: pg.PoolClient, statement: string, data: Buffer): Promise<void> {
  const stream = client.query(copyFrom(statement));
  const done = once(stream, 'finish');
  stream.end(data);
  await done;
}

/** A lot as this import knows it, from the first row that names it. */
export interface LotEntry {
  number: string;
  productId: number;
  lineId: number;
  producedAt: number;
  shift: string | null;
  /** File row that first named it, for messages. */
  row: number;
  /** Its id: stored, or given to it for this import; 0 until the round that names it is prepared. */
  id: number;
  /** Stored before this import, so its stored measurements may clash with the file's. */
  stored: boolean;
  /** Recorded with another product, line or production time: the file's rows of it are refused. */
  clash: boolean;
}

/**
 * Checked rows gathered for one round of lookups and COPY, column by column: a row costs about 50 bytes
 * here instead of an object with its strings, and nothing of a row outlives the piece it was read in
 * except these columns, so the garbage collector never has to move a round's rows to the old space.
 */
export class Round {
  length = 0;
  readonly lot: LotEntry[] = [];
  readonly characteristicId = new Int32Array(ROWS_PER_STORE);
  readonly replicate = new Int32Array(ROWS_PER_STORE);
  readonly row = new Int32Array(ROWS_PER_STORE);
  readonly value = new Float64Array(ROWS_PER_STORE);
  /** Unix milliseconds; NaN where the file gives no test time. */
  readonly testedAt = new Float64Array(ROWS_PER_STORE);
  readonly operator: (string | null)[] = [];
  readonly note: (string | null)[] = [];
  /** Lots first named in this round. */
  readonly newLots: LotEntry[] = [];
}

/**
 * The round's rows grouped by characteristic, in file order within each: the live key of measurements
 * leads with the characteristic, so consecutive rows go to the same index pages (trial COPYs of
 * 100,000 rows took 5–8 % less time than in file order) and a chart's readings lie together in the
 * table. Ids follow this order.
 */
export function byCharacteristic(round: Round): Int32Array {
  // A counting sort: a round names a few dozen characteristics, so two passes beat a comparison sort.
  const count = new Map<number, number>();
  for (let i = 0; i < round.length; i++) count.set(round.characteristicId[i], (count.get(round.characteristicId[i]) ?? 0) + 1);
  const next = new Map<number, number>();
  let offset = 0;
  for (const [id, n] of [...count].sort((a, b) => a[0] - b[0])) {
    next.set(id, offset);
    offset += n;
  }
  const order = new Int32Array(round.length);
  for (let i = 0; i < round.length; i++) {
    const at = next.get(round.characteristicId[i])!;
    order[at] = i;
    next.set(round.characteristicId[i], at + 1);
  }
  return order;
}

/** A round ready for COPY; no data once the import has failed. */
export interface EncodedRound {
  rows: number;
  lots: Buffer | null;
  measurements: Buffer | null;
}

/** Lots of a round already stored, and new ids for the round's other lots and its measurements. */
export interface RoundLookup {
  stored: { id: number; n: string; p: number; l: number; t: number }[];
  lotIds: number[];
  measurementIds: number[];
}

/**
 * Looks up the round's new lots among the stored ones and takes `newLots` lot ids and `newMeasurements`
 * measurement ids from their sequences, in one statement. New ids come as a first id and a count when
 * the sequence handed out a run without gaps (the usual case), as a list otherwise: 10,000 ids in a text
 * array take longer to read than to make.
 */
export async function lookUpRound(reader: pg.PoolClient, lotNumbers: string[], newLots: number, newMeasurements: number): Promise<RoundLookup> {
  const res = await reader.query<{ stored: RoundLookup['stored']; lot_ids: IdBlock; measurement_ids: IdBlock }>(
    `with lot_ids as (select nextval('lots_id_seq')::int as id from generate_series(1, $2::int)),
          measurement_ids as (select nextval('measurements_id_seq')::int as id from generate_series(1, $3::int))
     select coalesce((select json_agg(json_build_object('id', id, 'n', lot_number, 'p', product_id, 'l', line_id, 't', extract(epoch from produced_at) * 1000))
                      from lots where lot_number = any($1::text[])), '[]') as stored,
            (select ${idBlock} from lot_ids) as lot_ids,
            (select ${idBlock} from measurement_ids) as measurement_ids`,
    [lotNumbers, newLots, newMeasurements],
  );
  return { stored: res.rows[0].stored, lotIds: idsOf(res.rows[0].lot_ids), measurementIds: idsOf(res.rows[0].measurement_ids) };
}

/** Of the readings (lot, characteristic, replicate) given for stored lots, the 1-based positions of those already stored live. */
export async function storedReadings(reader: pg.PoolClient, lotIds: number[], characteristicIds: number[], replicates: number[]): Promise<number[]> {
  const keys = await reader.query<{ i: number }>(
    `select u.i::int as i from unnest($1::int[], $2::int[], $3::int[]) with ordinality as u(lot_id, characteristic_id, replicate, i)
     where exists (select 1 from measurements m where m.characteristic_id = u.characteristic_id and m.lot_id = u.lot_id and m.replicate = u.replicate and m.voided_at is null)`,
    [lotIds, characteristicIds, replicates],
  );
  return keys.rows.map((r) => r.i);
}

/** Stores an encoded round by COPY: its new lots first, then its measurements. */
export async function copyRound(client: pg.PoolClient, lots: Buffer | null, measurements: Buffer): Promise<void> {
  if (lots) await copyIn(client, 'COPY lots (id, lot_number, product_id, line_id, produced_at, shift) FROM STDIN (FORMAT binary)', lots);
  await copyIn(client, 'COPY measurements (id, lot_id, characteristic_id, replicate, value, tested_at, operator, note, source, upload_id, entered_by) FROM STDIN (FORMAT binary)', measurements);
}
