// The audit trail's API against the real database and the demo seed. Outside references: PostgreSQL's
// own time-zone conversion (`at time zone`, IANA tz database) and ECMA-402's Intl.DateTimeFormat for the
// plant days; RFC 4180 for the CSV shape (CRLF line ends, quoted fields) read back with papaparse, a
// general-purpose CSV reader; the OWASP "CSV Injection" advice (a leading apostrophe) for formula cells;
// the Unicode standard's byte-order mark U+FEFF (EF BB BF in UTF-8).
import request from 'supertest';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { createTestApi } from '@tests/support/api';
import { csvDocument, type CsvValue } from '@shared/csv';
import { plantIso } from '@shared/time';
import type { AuditChainVerdict, AuditEventPage, AuditEventView, AuditFacets } from '@shared/schemas/audit-events';
import { AUDIT_CSV_HEADER } from '@api/audit/csv';

const api = createTestApi();
afterAll(() => api.close());

let auditor: Record<string, string>;
let timeZone: string;
beforeAll(async () => {
  auditor = { authorization: `Bearer ${await api.tokenFor('auditor')}` };
  timeZone = (await api.db.execute<{ time_zone: string }>(sql`select time_zone from plants order by id limit 1`)).rows[0].time_zone;
});

const list = async (query: string, headers = auditor) => {
  const res = await request(api.app).get(`/api/v1/audit-events?${query}`).set(headers);
  expect(res.status, `${query}: ${JSON.stringify(res.body)}`).toBe(200);
  return res.body as AuditEventPage;
};

/** Every event of a filter, page by page. */
async function everyPage(query: string, limit: number): Promise<AuditEventView[]> {
  const all: AuditEventView[] = [];
  let after: number | null = null;
  for (let pages = 0; pages < 10_000; pages++) {
    const page: AuditEventPage = await list(`${query}&limit=${limit}${after ? `&after=${after}` : ''}`);
    all.push(...page.items);
    if (page.nextCursor === null) return all;
    after = page.nextCursor;
  }
  throw new Error('The pages never end');
}

/** The plant day of an instant by ECMA-402 (Intl), independent of @shared/time. */
const intlDay = (iso: string) => new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date(iso));

describe('GET /api/v1/audit-events', () => {
  it('lets the auditor and the administrator read the trail and refuses the technician and the quality manager', async () => {
    for (const role of ['auditor', 'admin'] as const) {
      expect((await request(api.app).get('/api/v1/audit-events?limit=1').set({ authorization: `Bearer ${await api.tokenFor(role)}` })).status, role).toBe(200);
    }
    for (const role of ['technician', 'quality_manager'] as const) {
      for (const path of ['/api/v1/audit-events', '/api/v1/audit-events/facets', '/api/v1/audit-events/verify', '/api/v1/audit-events.csv']) {
        expect((await request(api.app).get(path).set({ authorization: `Bearer ${await api.tokenFor(role)}` })).status, `${role} ${path}`).toBe(403);
      }
    }
  });

  it('pages through a filter newest first, each event exactly once, as many as the database holds', async () => {
    const events = await everyPage('entity=lot', 7);
    const [{ n }] = (await api.db.execute<{ n: number }>(sql`select count(*)::int as n from audit_events where entity = 'lot'`)).rows;
    expect(n).toBeGreaterThan(7);
    expect(events).toHaveLength(n);
    expect(new Set(events.map((e) => e.seq)).size).toBe(n);
    const seqs = events.map((e) => e.seq);
    expect(seqs).toEqual([...seqs].sort((a, b) => b - a));
    for (const e of events) {
      expect(e.entity).toBe('lot');
      expect(e.link).toBe(`/results/lots/${encodeURIComponent(e.entityId!)}`);
      expect(e.sentence).toContain(e.entityId);
    }
  });

  it('filters by record, user, the system, action, period and words', async () => {
    const lotEvent = (await list('entity=lot&action=hold&limit=1')).items[0];
    expect(lotEvent).toMatchObject({ entity: 'lot', action: 'hold' });
    const byRecord = await everyPage(`entity=lot&entityId=${encodeURIComponent(lotEvent.entityId!)}`, 50);
    expect(byRecord.length).toBeGreaterThan(0);
    expect(byRecord.every((e) => e.entityId === lotEvent.entityId)).toBe(true);

    const actorId = lotEvent.actor!.id;
    const byActor = await list(`actor=${actorId}&limit=200`);
    expect(byActor.items.length).toBeGreaterThan(0);
    expect(byActor.items.every((e) => e.actor?.id === actorId)).toBe(true);
    const bySystem = await list('actor=system&limit=200');
    expect(bySystem.items.length).toBeGreaterThan(0);
    expect(bySystem.items.every((e) => e.actor === null)).toBe(true);

    const byAction = await list('action=release&limit=200');
    expect(byAction.items.length).toBeGreaterThan(0);
    expect(byAction.items.every((e) => e.action === 'release')).toBe(true);

    // A three-day period around the hold, in plant days: counted again by PostgreSQL's own zone conversion.
    const day = intlDay(lotEvent.at);
    const from = new Date(Date.parse(`${day}T00:00:00Z`) - 86_400_000).toISOString().slice(0, 10);
    const to = new Date(Date.parse(`${day}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
    const inPeriod = await everyPage(`from=${from}&to=${to}`, 200);
    const [{ n }] = (
      await api.db.execute<{ n: number }>(sql`select count(*)::int as n from audit_events where (at at time zone ${timeZone})::date between ${from}::date and ${to}::date`)
    ).rows;
    expect(inPeriod).toHaveLength(n);
    expect(inPeriod.every((e) => intlDay(e.at) >= from && intlDay(e.at) <= to)).toBe(true);
    expect(inPeriod.map((e) => e.seq)).toContain(lotEvent.seq);

    const words = lotEvent.entityId!.slice(-5);
    const byWords = await everyPage(`q=${encodeURIComponent(words)}`, 200);
    expect(byWords.map((e) => e.seq)).toContain(lotEvent.seq);
    for (const e of byWords) {
      const haystack = [e.reason, e.entityId, JSON.stringify(e.before), JSON.stringify(e.after), e.actor?.name].join(' ').toLowerCase();
      expect(haystack).toContain(words.toLowerCase());
    }
    // ILIKE's wildcards typed by a user are searched for as they are: no event holds "%_%zz".
    expect((await list('q=%25_%25zz&limit=5')).items).toEqual([]);
  });

  it('names the pick lists from what the trail holds', async () => {
    const res = await request(api.app).get('/api/v1/audit-events/facets').set(auditor);
    expect(res.status).toBe(200);
    const facets = res.body as AuditFacets;
    const lot = facets.entities.find((e) => e.entity === 'lot');
    expect(lot?.actions).toEqual(expect.arrayContaining(['hold', 'release']));
    expect(facets.actors.map((a) => a.name)).toEqual(expect.arrayContaining([expect.any(String)]));
    expect(facets.systemActs).toBe(true);
    expect(Date.parse(facets.first!)).toBeLessThanOrEqual(Date.parse(facets.last!));
  });

  it('refuses bad filters with a plain message, never a server error', async () => {
    for (const q of [
      'actor=2147483648',
      'actor=1.5',
      'actor=somebody',
      'after=0',
      'after=x',
      'entity=pallet',
      'action=explode',
      'entity=lot&action=raise',
      'from=2026-02-30',
      'from=2026-03-02&to=2026-03-01',
      'q=a%00b',
      'entityId=L1%00',
      `q=${'x'.repeat(101)}`,
      'limit=0',
      'limit=201',
      'limit=ten',
    ]) {
      const res = await request(api.app).get(`/api/v1/audit-events?${q}`).set(auditor);
      expect(res.status, q).toBe(400);
      expect(res.body.error, q).toEqual(expect.any(String));
      const csv = await request(api.app).get(`/api/v1/audit-events.csv?${q}`).set(auditor);
      if (!/^(after|limit)=/.test(q)) expect(csv.status, `csv ${q}`).toBe(400);
    }
  });
});

describe('GET /api/v1/audit-events.csv', () => {
  it('streams the filtered trail as the product writes every CSV, formula text neutralised, one row an event of the list', async () => {
    const manager = { authorization: `Bearer ${await api.tokenFor('quality_manager')}` };
    const [lot] = (
      await api.db.execute<{ lot_number: string }>(sql`
        select lot_number from lots l where not exists (select 1 from lot_holds h where h.lot_id = l.id) order by produced_at desc, id desc limit 1`)
    ).rows;
    // Real writes whose reasons a spreadsheet would run as formulas (OWASP "CSV Injection" examples).
    const holdReason = '=HYPERLINK("http://example.invalid/?leak","Open")';
    const releaseReason = '@SUM(1+1) cleared after retest';
    const path = `/api/v1/lots/${encodeURIComponent(lot.lot_number)}`;
    expect((await request(api.app).post(`${path}/hold`).set(manager).send({ reason: holdReason })).status).toBe(200);
    expect((await request(api.app).post(`${path}/release`).set(manager).send({ reason: releaseReason })).status).toBe(200);

    const filter = `entity=lot&entityId=${encodeURIComponent(lot.lot_number)}`;
    const res = await request(api.app)
      .get(`/api/v1/audit-events.csv?${filter}`)
      .set(auditor)
      .buffer(true)
      .parse((r, done) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => done(null, Buffer.concat(chunks)));
      });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="audit-trail.*\.csv"$/);
    const bytes = res.body as Buffer;
    expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const text = bytes.toString('utf8').slice(1);
    // Every line ends CRLF: no bare LF anywhere outside a quoted field (none of these fields holds one).
    expect(text.endsWith('\r\n')).toBe(true);
    expect(text.split('\r\n').every((line) => !line.includes('\n'))).toBe(true);
    expect(text.split('\r\n')[0]).toBe('seq,at,actor,role,entity,entity_id,action,reason,before,after,hash,prev_hash');

    const parsed = Papa.parse<string[]>(text, { newline: '\r\n', skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    const [header, ...rows] = parsed.data;
    expect(header).toEqual([...AUDIT_CSV_HEADER]);
    const listed = await everyPage(filter, 200);
    expect(rows).toHaveLength(listed.length);
    expect(rows.map((r) => Number(r[0]))).toEqual(listed.map((e) => e.seq).reverse());
    const reasons = rows.map((r) => r[7]);
    expect(reasons).toContain(`'${holdReason}`);
    expect(reasons).toContain(`'${releaseReason}`);
    for (const r of rows) {
      expect(r[1]).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d[+-]\d\d:\d\d$/);
      expect(r[10]).toMatch(/^[0-9a-f]{64}$/);
    }

    // The same rows read with a plain SELECT and written with @shared/csv give the very same bytes.
    const plain = (
      await api.db.execute<{ seq: string; at: Date; actor: string | null; role: string | null; entity: string; entity_id: string | null; action: string; reason: string | null; before: string | null; after: string | null; hash: string; prev_hash: string }>(sql`
        select e.seq, e.at, case when e.actor_id is null then 'the system' else u.name end as actor, u.role::text as role, e.entity, e.entity_id, e.action, e.reason,
               e.before::text as before, e.after::text as after, e.hash, e.prev_hash
        from audit_events e left join users u on u.id = e.actor_id where e.entity = 'lot' and e.entity_id = ${lot.lot_number} order by e.seq`)
    ).rows;
    const expected = csvDocument([
      [...AUDIT_CSV_HEADER],
      ...plain.map((p): CsvValue[] => [Number(p.seq), plantIso(p.at, timeZone), p.actor, p.role, p.entity, p.entity_id, p.action, p.reason, p.before, p.after, p.hash, p.prev_hash]),
    ]);
    expect(bytes.toString('utf8')).toBe(expected);
  });

  it('writes the same number of rows as the list holds for a period', async () => {
    const facets = (await request(api.app).get('/api/v1/audit-events/facets').set(auditor)).body as AuditFacets;
    const to = intlDay(facets.last!);
    const from = new Date(Date.parse(`${to}T00:00:00Z`) - 20 * 86_400_000).toISOString().slice(0, 10);
    const listed = await everyPage(`from=${from}&to=${to}`, 200);
    const res = await request(api.app).get(`/api/v1/audit-events.csv?from=${from}&to=${to}`).set(auditor);
    expect(res.status).toBe(200);
    expect(res.headers['content-disposition']).toContain(`audit-trail-from-${from}-to-${to}.csv`);
    const parsed = Papa.parse<string[]>(res.text.replace(/^\uFEFF/, ''), { newline: '\r\n', skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data.length - 1).toBe(listed.length);
    expect(listed.length).toBeGreaterThan(0);
  });
});

describe('GET /api/v1/audit-events/verify', () => {
  it('finds the seeded chain intact', async () => {
    const res = await request(api.app).get('/api/v1/audit-events/verify').set(auditor);
    expect(res.status).toBe(200);
    const verdict = res.body as AuditChainVerdict;
    expect(verdict).toMatchObject({ intact: true, firstBroken: null });
    const [{ n }] = (await api.db.execute<{ n: number }>(sql`select count(*)::int as n from audit_events`)).rows;
    expect(verdict.events).toBeGreaterThanOrEqual(n);
  });

  it('names the link of a row changed past the guard', async () => {
    // The table's owner lifts the append-only guard for one statement, as an intruder with that power could.
    const rewrite = (seq: number, reason: string | null) =>
      api.db.transaction(async (tx) => {
        await tx.execute(sql`alter table audit_events disable trigger audit_events_append_only`);
        try {
          await tx.execute(sql`update audit_events set reason = ${reason} where seq = ${seq}`);
        } finally {
          await tx.execute(sql`alter table audit_events enable trigger audit_events_append_only`);
        }
      });
    const [target] = (await api.db.execute<{ seq: string; reason: string | null }>(sql`select seq, reason from audit_events where entity = 'lot' order by seq limit 1`)).rows;
    const seq = Number(target.seq);
    await rewrite(seq, `${target.reason ?? ''} (rewritten)`);
    try {
      const res = await request(api.app).get('/api/v1/audit-events/verify').set(auditor);
      expect(res.status).toBe(200);
      expect(res.body).toMatchObject({ intact: false, firstBroken: { seq, problem: 'content-changed' } });
      expect(res.body.firstBroken.message).toContain(`Link ${seq} `);
    } finally {
      // The original content gives the original hash again: the chain holds once more.
      await rewrite(seq, target.reason);
    }
    expect((await request(api.app).get('/api/v1/audit-events/verify').set(auditor)).body.intact).toBe(true);
  });
});
