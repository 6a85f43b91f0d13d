// Charts computed once per state of their data. Building a chart reads every live value of the
// characteristic and runs the engine twice (trial and frozen limits); checking whether the data
// changed is one small query over indexes. So a chart is kept, with its JSON text, under a version
// made of:
// - the newest audit-trail row: every change through the API (uploads, corrections, voids,
//   exclusions, freezes) writes one in its own transaction;
// - the characteristic's newest measurement id and live count, exclusion and limit-revision rows,
//   specification revisions and the newest process event, so that a writer that forgot the audit
//   row still invalidates the chart.
// A version is read per request; a chart is also dropped after MAX_AGE_MS, because the
// specification "in force now" can change with the clock alone.
import { createHash } from 'node:crypto';
import { gzipSync } from 'node:zlib';
import { sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import type { ChartWindow } from '@api/spc/chart-assembly';
import { computeCharacteristicChart } from '@api/spc/chart-load';
import type { CharacteristicChart } from '@shared/schemas/charts';

const MAX_ENTRIES = 96;
/** Points held over all entries: a 10,000-point chart weighs some 15 MB as object and JSON together. */
const MAX_POINTS = 300_000;
const MAX_AGE_MS = 5 * 60_000;

export interface CachedChart {
  chart: CharacteristicChart;
  /** The chart as the JSON the endpoint sends, made on first use. */
  body(): Buffer;
  /** The same JSON gzipped (a tenth of the size), made on first use. */
  gzipped(): Buffer;
  etag: string;
}

interface Entry {
  version: string;
  at: number;
  value: Promise<CachedChart>;
  /** Points of the chart once computed; 0 while it is being computed. */
  points: number;
}

const windowKey = (id: number, w: ChartWindow) => `${id}|${w.period ?? ''}|${w.from?.toISOString() ?? ''}|${w.to?.toISOString() ?? ''}`;

export class ChartCache {
  private readonly entries = new Map<string, Entry>();

  constructor(private readonly db: Database) {}

  /** The data version of each characteristic, read in one query. */
  async versions(ids: number[]): Promise<Map<number, string>> {
    if (ids.length === 0) return new Map();
    const result = await this.db.execute<{ id: number; v: string }>(sql`
      with ids as (select unnest(${sql.param(ids)}::int[]) as id),
           globals as (
             select (select coalesce(max(id), 0) from audit_events) as audit,
                    (select coalesce(max(id), 0) from process_events) as events)
      select ids.id,
             concat_ws('.', g.audit, g.events, m.newest, m.live, e.newest, e.active, r.newest, r.active, s.newest, s.total) as v
      from ids cross join globals g
      cross join lateral (
        -- Live and voided rows apart: each has an index that leads with the characteristic.
        select greatest((select coalesce(max(id), 0) from measurements where characteristic_id = ids.id and voided_at is not null), coalesce(max(id), 0)) as newest,
               count(*) as live
        from measurements where characteristic_id = ids.id and voided_at is null) m
      cross join lateral (
        select coalesce(max(id), 0) as newest, count(*) filter (where removed_at is null) as active
        from point_exclusions where characteristic_id = ids.id) e
      cross join lateral (
        select coalesce(max(id), 0) as newest, count(*) filter (where superseded_at is null) as active
        from control_limit_revisions where characteristic_id = ids.id) r
      cross join lateral (
        select coalesce(max(id), 0) as newest, count(*) as total
        from spec_limits where characteristic_id = ids.id) s`);
    return new Map(result.rows.map((r) => [Number(r.id), r.v]));
  }

  async get(id: number, window: ChartWindow = {}, knownVersion?: string): Promise<CachedChart> {
    const version = knownVersion ?? (await this.versions([id])).get(id) ?? '';
    const key = windowKey(id, window);
    const now = Date.now();
    const hit = this.entries.get(key);
    if (hit && hit.version === version && now - hit.at < MAX_AGE_MS) {
      // Most recently used last, so the oldest entry is the first one dropped.
      this.entries.delete(key);
      this.entries.set(key, hit);
      return hit.value;
    }
    // Concurrent requests for the same version share one computation.
    const value = this.compute(id, window, `${key}|${version}`);
    const entry: Entry = { version, at: now, value, points: 0 };
    this.entries.delete(key);
    this.entries.set(key, entry);
    value.then(
      (cached) => {
        entry.points = cached.chart.points.length;
        this.trim();
      },
      () => {
        if (this.entries.get(key) === entry) this.entries.delete(key);
      },
    );
    this.trim();
    return value;
  }

  /** Drops the least recently used charts beyond the entry and point budgets. */
  private trim(): void {
    let points = 0;
    for (const e of this.entries.values()) points += e.points;
    for (const [key, e] of this.entries) {
      if (this.entries.size <= MAX_ENTRIES && points <= MAX_POINTS) break;
      this.entries.delete(key);
      points -= e.points;
    }
  }

  private async compute(id: number, window: ChartWindow, versionKey: string): Promise<CachedChart> {
    const chart: CharacteristicChart = await computeCharacteristicChart(this.db, id, window);
    let body: Buffer | null = null;
    let gzipped: Buffer | null = null;
    const json = () => (body ??= Buffer.from(JSON.stringify(chart)));
    return {
      chart,
      body: json,
      gzipped: () => (gzipped ??= gzipSync(json(), { level: 6 })),
      etag: `"${createHash('sha1').update(versionKey).digest('base64url')}"`,
    };
  }
}

const caches = new WeakMap<Database, ChartCache>();

/** One cache per database, shared by the chart and overview routes. */
export function chartCacheFor(db: Database): ChartCache {
  let cache = caches.get(db);
  if (!cache) {
    cache = new ChartCache(db);
    caches.set(db, cache);
  }
  return cache;
}
