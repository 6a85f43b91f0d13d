// The chart endpoint and the exclusion and freeze routes against the seeded demo plant.
// Limits are checked against the published control chart factors (ASTM E2587 table of constants,
// also in the NIST/SEMATECH e-Handbook §6.3.2), capability against simple-statistics.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { desc, eq } from 'drizzle-orm';
import { mean as ssMean, sampleStandardDeviation } from 'simple-statistics';
import { createTestApi } from '@tests/support/api';
import { isDemoCode } from '@tests/support/catalogue';
import { createTestCharacteristic, removeTestCharacteristics, testDay, testPair } from '@tests/support/plant';
import { characteristics, spcRunItems, spcRuns } from '@api/db/schema';
import type { CharacteristicChart, ChartPointRecord, LimitRevisionRecord } from '@shared/schemas/charts';
import type { Role } from '@shared/schemas/users';

const api = createTestApi();
afterAll(async () => {
  await removeTestCharacteristics(api.db);
  await api.close();
});

const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });

// ASTM E2587, factors for X̄ and R charts (n = 2, 3) and X̄ and S charts (n = 10), three decimals.
const A2 = { 2: 1.88, 3: 1.023 } as const;
const D4 = { 2: 3.267, 3: 2.574 } as const;
const A3_10 = 0.975;
const B4_10 = 1.716;
const C4_10 = 0.9727;

const ids = new Map<string, number>();
beforeAll(async () => {
  for (const c of await api.db.select({ id: characteristics.id, code: characteristics.code }).from(characteristics)) ids.set(c.code, c.id);
});
const idOf = (code: string) => {
  const id = ids.get(code);
  if (!id) throw new Error(`The demo seed has no characteristic ${code}`);
  return id;
};

async function chartOf(code: string, role: Role = 'auditor', query = '?period=all'): Promise<CharacteristicChart> {
  const res = await request(api.app).get(`/api/v1/characteristics/${idOf(code)}/chart${query}`).set(await as(role));
  expect(res.status).toBe(200);
  return res.body as CharacteristicChart;
}

const average = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
const range = (xs: number[]) => Math.max(...xs) - Math.min(...xs);
const kept = (points: ChartPointRecord[]) => points.filter((p) => !p.excluded);

/** The demo's limit revisions of a characteristic, newest (in force) first. */
async function revisionsOf(code: string): Promise<LimitRevisionRecord[]> {
  const res = await request(api.app).get(`/api/v1/characteristics/${idOf(code)}/limit-revisions`).set(await as('auditor'));
  expect(res.status).toBe(200);
  return res.body.items as LimitRevisionRecord[];
}

/** The points of a revision's baseline: the chart of its baseline window. */
const baselineOf = async (code: string, r: LimitRevisionRecord) =>
  (await chartOf(code, 'auditor', `?from=${encodeURIComponent(r.baselineFrom)}&to=${encodeURIComponent(r.baselineTo)}`)).points;

/** Textbook X̄–R limits from the kept points (A2 and D4 from the ASTM table). */
function xbarRLimits(points: ChartPointRecord[], n: 2 | 3) {
  const k = kept(points);
  const grand = average(k.map((p) => average(p.values)));
  const rBar = average(k.map((p) => range(p.values)));
  return { center: grand, ucl: grand + A2[n] * rBar, lcl: grand - A2[n] * rBar, rBar, rUcl: D4[n] * rBar };
}

describe('GET /api/v1/characteristics/:id/chart', () => {
  // Flow after 30 min carries the same planted step as the flow itself, which the browser test changes.
  it('charts HV Level 25 flow after 30 min as X̄–R with textbook limits from the baseline after the planted step change', async () => {
    const chart = await chartOf('HVL25-FLOW30');
    expect(chart.characteristic).toMatchObject({ code: 'HVL25-FLOW30', chartType: 'xbar-r', subgroupSize: 2, unit: 'mm', productName: 'HV Level 25' });
    expect(chart.spec).toMatchObject({ lsl: 128, usl: 150, target: 139 });
    expect(chart.points.length).toBeGreaterThan(300);

    // One point per lot, in production order, its statistics from its own replicates.
    for (let i = 1; i < chart.points.length; i++) expect(Date.parse(chart.points[i].producedAt)).toBeGreaterThanOrEqual(Date.parse(chart.points[i - 1].producedAt));
    for (const p of chart.points.slice(0, 50)) {
      expect(p.values).toHaveLength(2);
      expect(p.location).toBeCloseTo(average(p.values), 9);
      expect(p.dispersion).toBeCloseTo(range(p.values), 9);
    }

    // The demo's manager recalculated the limits from the lots after the new sand source.
    const [inForce, initial] = await revisionsOf('HVL25-FLOW30');
    expect(chart.limits).toMatchObject({ source: 'frozen', revisionId: inForce.id, reason: 'New sand source: limits recalculated from the new level' });
    const book = xbarRLimits(await baselineOf('HVL25-FLOW30', inForce), 2);
    expect(chart.limits.location.center).toBeCloseTo(book.center, 6);
    // The table's factors carry three decimals: agreement to a hundredth of a millimetre.
    expect(Math.abs(chart.limits.location.ucl! - book.ucl)).toBeLessThan(0.01);
    expect(Math.abs(chart.limits.location.lcl! - book.lcl)).toBeLessThan(0.01);
    expect(Math.abs(chart.limits.dispersion.ucl! - book.rUcl)).toBeLessThan(0.01);
    expect(chart.limits.dispersion.lcl).toBe(0);
    // Zone lines split each side into thirds (ISO 7870-2 zones C, B, A).
    const third = (chart.limits.location.ucl! - chart.limits.location.center!) / 3;
    expect(chart.limits.zones!.plus1).toBeCloseTo(chart.limits.location.center! + third, 9);
    expect(chart.limits.zones!.minus2).toBeCloseTo(chart.limits.location.center! - 2 * third, 9);

    // The new sand source is an event; the lots before it keep the first limits, the lots after it are
    // judged on the new level, lower by about the planted 2.5 within-lot standard deviations of 2.2 mm.
    const sand = chart.events.find((e) => e.title === 'New sand source');
    expect(sand).toBeDefined();
    const sandMs = Date.parse(sand!.occurredAt);
    expect(Date.parse(inForce.baselineFrom)).toBe(sandMs);
    for (const p of chart.points) expect(p.center).toBe(Date.parse(p.producedAt) < sandMs ? initial.center : inForce.center);
    expect(initial.center - inForce.center).toBeGreaterThan(4.5);
    expect(initial.center - inForce.center).toBeLessThan(6.5);
    // Every violation is explained in words and marked on its point.
    for (const v of chart.violations) {
      expect(v.description.length).toBeGreaterThan(20);
      expect(chart.points[v.index].rules).toContain(v.rule);
    }
  });

  it('sends the same chart gzipped to a client that accepts it', async () => {
    const url = `/api/v1/characteristics/${idOf('HVL25-DENS')}/chart`;
    const h = await as('auditor');
    const plain = await request(api.app).get(url).set(h).set('Accept-Encoding', 'identity');
    const zipped = await request(api.app).get(url).set(h).set('Accept-Encoding', 'gzip, deflate');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(zipped.headers['content-encoding']).toBe('gzip');
    expect(Number(zipped.headers['content-length'])).toBeLessThan(Number(plain.headers['content-length']) / 4);
    expect(zipped.body).toEqual(plain.body);
  });

  it('answers a browser that holds the same state of the chart with 304', async () => {
    const h = await as('technician');
    const url = `/api/v1/characteristics/${idOf('HVL25-FLOW')}/chart`;
    const first = await request(api.app).get(url).set(h);
    expect(first.status).toBe(200);
    expect(first.headers.etag).toBeTruthy();
    const again = await request(api.app).get(url).set(h).set('If-None-Match', first.headers.etag);
    expect(again.status).toBe(304);
  });

  it('restricts the chart to a window of production time', async () => {
    const all = await chartOf('HVL25-DENS');
    const from = all.points[100].producedAt;
    const to = all.points[199].producedAt;
    const part = await chartOf('HVL25-DENS', 'auditor', `?from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`);
    expect(part.points).toHaveLength(100);
    expect(part.points[0].lotNumber).toBe(all.points[100].lotNumber);
    expect(part.characteristic.chartType).toBe('imr');
    // The window is judged against the frozen limits, which are centre ± 2.660 · MR̄ of their baseline
    // (E2 = 3/d2 with d2 = 1.128, ASTM E2587).
    const [inForce] = await revisionsOf('HVL25-DENS');
    expect(part.limits.location.ucl).toBeCloseTo(inForce.locationUcl, 9);
    const x = (await baselineOf('HVL25-DENS', inForce)).map((p) => p.location);
    const mrBar = average(x.slice(1).map((v, i) => Math.abs(v - x[i])));
    expect(Math.abs(inForce.locationUcl - (average(x) + 2.66 * mrBar))).toBeLessThan(0.05);
  });

  it('opens on the period since the limits in force apply, with all history one choice away', async () => {
    // HVL25-FLOW's limits were recalculated from the new level after the sand source changed (demo scenario).
    const [inForce] = await revisionsOf('HVL25-FLOW');
    const start = Date.parse(inForce.baselineFrom);
    const all = await chartOf('HVL25-FLOW');
    const byDefault = await chartOf('HVL25-FLOW', 'auditor', '');
    expect(byDefault.window).toEqual({ period: 'limits', from: inForce.baselineFrom, to: null, limitsFrom: inForce.baselineFrom });
    const since = all.points.filter((p) => Date.parse(p.producedAt) >= start);
    expect(since.length).toBeGreaterThan(20);
    expect(byDefault.points.map((p) => p.lotNumber)).toEqual(since.map((p) => p.lotNumber));
    // No point of the default period is judged by the limits of before the change.
    for (const p of byDefault.points) expect(p.center).toBe(inForce.center);
    expect(all.window).toMatchObject({ period: 'all', from: null, limitsFrom: inForce.baselineFrom });
    expect(all.points.length).toBeGreaterThan(byDefault.points.length);
    // A characteristic under trial limits has no such period: its default is all history, and says so.
    const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2 });
    for (let i = 0; i < 3; i++) await t.addLot(`T${i}`, testDay(i), testPair(i));
    const trial = await request(api.app).get(`/api/v1/characteristics/${t.characteristicId}/chart`).set(await as('auditor'));
    expect(trial.body.limits.source).toBe('trial');
    expect(trial.body.points).toHaveLength(3);
    expect(trial.body.window).toEqual({ period: 'all', from: null, to: null, limitsFrom: null });
    // Later tests here count the demo plant's characteristics.
    await removeTestCharacteristics(api.db);
  });

  it('opens a linked lot in the first period that holds it, by its lot number', async () => {
    const [inForce] = await revisionsOf('HVL25-FLOW');
    const all = await chartOf('HVL25-FLOW');
    const newest = all.points.at(-1)!;
    const recent = await chartOf('HVL25-FLOW', 'auditor', `?lot=${encodeURIComponent(newest.lotNumber)}`);
    expect(recent.window.period).toBe('limits');
    // The oldest lot lies before the change: the period that holds it is a longer one, and the lot is on it.
    const oldest = all.points[0];
    expect(Date.parse(oldest.producedAt)).toBeLessThan(Date.parse(inForce.baselineFrom));
    const linked = await chartOf('HVL25-FLOW', 'auditor', `?lot=${encodeURIComponent(oldest.lotNumber)}`);
    expect(linked.window.period).not.toBe('limits');
    const shown = linked.points.find((p) => p.lotNumber === oldest.lotNumber);
    expect(shown).toMatchObject({ producedAt: oldest.producedAt, values: oldest.values });
    if (linked.window.from) expect(Date.parse(linked.window.from)).toBeLessThanOrEqual(Date.parse(oldest.producedAt));
    // An explicit period wins over the lot; an unknown lot opens the default period.
    expect((await chartOf('HVL25-FLOW', 'auditor', `?period=30&lot=${encodeURIComponent(oldest.lotNumber)}`)).window.period).toBe('30');
    expect((await chartOf('HVL25-FLOW', 'auditor', '?lot=NO-SUCH-LOT')).window.period).toBe('limits');
  });

  it('refuses unknown characteristics and unreadable dates in plain words', async () => {
    const h = await as('auditor');
    const missing = await request(api.app).get('/api/v1/characteristics/999999/chart').set(h);
    expect(missing.status).toBe(404);
    expect(missing.body.error).toMatch(/Characteristic 999999 not found/);
    const bad = await request(api.app).get(`/api/v1/characteristics/${idOf('HVL25-FLOW')}/chart?from=yesterday-ish`).set(h);
    expect(bad.status).toBe(400);
    expect(bad.body.error).toBe('from: Enter a valid date');
    const url = `/api/v1/characteristics/${idOf('HVL25-FLOW')}/chart`;
    const nul = await request(api.app).get(`${url}?lot=L1%00`).set(h);
    expect(nul.status).toBe(400);
    expect(nul.body.error).toBe('lot: A lot number has no control characters');
    expect((await request(api.app).get(`${url}?lot=${'9'.repeat(65)}`).set(h)).status).toBe(400);
    expect((await request(api.app).get(`${url}?period=week`).set(h)).body.error).toMatch(/^period: period must be one of limits, 30, 90, 182, all/);
    expect((await request(api.app).get(`${url}?period=30&from=2026-01-01`).set(h)).status).toBe(400);
    const unsigned = await request(api.app).get(`/api/v1/characteristics/${idOf('HVL25-FLOW')}/chart`);
    expect(unsigned.status).toBe(401);
  });

  it('gives capability that agrees with an independent computation (X̄–S, n = 10)', async () => {
    const chart = await chartOf('HVFX-ADH28');
    expect(chart.characteristic.chartType).toBe('xbar-s');
    const k = kept(chart.points);
    const values = k.flatMap((p) => p.values);
    const lsl = chart.spec!.lsl!;
    const m = ssMean(values);
    const s = sampleStandardDeviation(values);
    const cap = chart.capability!;
    expect(cap.n).toBe(values.length);
    expect(cap.ppk).toBeCloseTo((m - lsl) / (3 * s), 6);
    // Sigma within S̄/c4 with c4(10) = 0.9727 (ASTM E2587); one-sided specification: Cpk = Cpl.
    const sBar = average(k.map((p) => sampleStandardDeviation(p.values)));
    expect(Math.abs(cap.cpk! - (m - lsl) / (3 * (sBar / C4_10)))).toBeLessThan(0.005);
    expect(cap.cp).toBeNull();
    // The frozen X̄ limits X̿ ± A3·S̄ and S limit B4·S̄ of their baseline.
    const [inForce] = await revisionsOf('HVFX-ADH28');
    expect(chart.limits.location.ucl).toBeCloseTo(inForce.locationUcl, 9);
    const base = kept(await baselineOf('HVFX-ADH28', inForce));
    const baseSBar = average(base.map((p) => sampleStandardDeviation(p.values)));
    expect(Math.abs(inForce.locationUcl - (average(base.map((p) => p.location)) + A3_10 * baseSBar))).toBeLessThan(0.002);
    expect(Math.abs(inForce.dispersionUcl! - B4_10 * baseSBar)).toBeLessThan(0.002);
  });
});

describe('exclusions', () => {
  it('lets a quality manager exclude a point with a reason, leaves it out of the rules under frozen limits, and takes it back', async () => {
    const code = 'HVLF-FLOW';
    const before = await chartOf(code);
    const center = before.limits.location.center!;
    const farthest = kept(before.points).reduce((a, b) => (Math.abs(b.location - center) > Math.abs(a.location - center) ? b : a));
    const url = `/api/v1/characteristics/${idOf(code)}/exclusions`;

    const technician = await request(api.app).post(url).set(await as('technician')).send({ lotId: farthest.lotId, reason: 'Mixer fault' });
    expect(technician.status).toBe(403);
    const auditor = await request(api.app).post(url).set(await as('auditor')).send({ lotId: farthest.lotId, reason: 'Mixer fault' });
    expect(auditor.status).toBe(403);

    const h = await as('quality_manager');
    const noReason = await request(api.app).post(url).set(h).send({ lotId: farthest.lotId, reason: ' ' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.details).toContainEqual({ path: 'reason', message: 'Give a reason of at least 3 characters' });

    const reason = 'Water dosing valve stuck open during this lot';
    const done = await request(api.app).post(url).set(h).send({ lotId: farthest.lotId, reason });
    expect(done.status).toBe(201);
    // The alarms follow the new limits without waiting for the night: an incremental run for this characteristic.
    const [run] = await api.db.select({ id: spcRuns.id, trigger: spcRuns.trigger }).from(spcRuns).orderBy(desc(spcRuns.id)).limit(1);
    expect(run.trigger).toBe('limits');
    const items = await api.db.select({ characteristicId: spcRunItems.characteristicId }).from(spcRunItems).where(eq(spcRunItems.runId, run.id));
    expect(items).toEqual([{ characteristicId: idOf(code) }]);
    const twice = await request(api.app).post(url).set(h).send({ lotId: farthest.lotId, reason });
    expect(twice.status).toBe(409);

    const after = await chartOf(code);
    const point = after.points.find((p) => p.lotId === farthest.lotId)!;
    expect(point).toMatchObject({ excluded: true, exclusionReason: reason, rules: [] });
    expect(kept(after.points)).toHaveLength(kept(before.points).length - 1);
    // Phase II: the frozen limits stay as they are; only a new freeze would take the exclusion in.
    expect(after.limits.source).toBe('frozen');
    expect(after.limits.location.center).toBe(center);

    const noBackReason = await request(api.app).delete(`${url}/${farthest.lotId}`).set(h).send({});
    expect(noBackReason.status).toBe(400);
    const back = await request(api.app).delete(`${url}/${farthest.lotId}`).set(h).send({ reason: 'Valve checked: it worked, cause not confirmed' });
    expect(back.status).toBe(200);
    const restored = await chartOf(code);
    expect(restored.limits.location.center).toBeCloseTo(center, 9);
    expect(restored.points.find((p) => p.lotId === farthest.lotId)!.excluded).toBe(false);
  });

  it('refuses to exclude a lot that has no point on the chart', async () => {
    const res = await request(api.app)
      .post(`/api/v1/characteristics/${idOf('HVLF-FLOW')}/exclusions`)
      .set(await as('admin'))
      .send({ lotId: 999999, reason: 'No such lot' });
    expect(res.status).toBe(404);
  });
});

describe('limit revisions', () => {
  it('freezes limits from a baseline, judges the chart against them and keeps the history', async () => {
    const code = 'HVR3-RF7';
    const url = `/api/v1/characteristics/${idOf(code)}/limit-revisions`;
    const before = await chartOf(code);
    const [initial] = await revisionsOf(code);
    expect(before.limits).toMatchObject({ source: 'frozen', revisionId: initial.id });
    const baseline = before.points.slice(0, 30);
    const baselineFrom = baseline[0].producedAt;
    const baselineTo = baseline.at(-1)!.producedAt;

    const h = await as('quality_manager');
    const backwards = await request(api.app).post(url).set(h).send({ baselineFrom: baselineTo, baselineTo: baselineFrom, reason: 'Stable period' });
    expect(backwards.status).toBe(400);
    expect(backwards.body.details).toContainEqual({ path: 'baselineTo', message: 'The baseline must end after it starts' });
    // A baseline with no points is well formed but cannot give limits: 422 with the plain reason.
    const empty = await request(api.app).post(url).set(h).send({ baselineFrom: '2099-01-01T00:00:00Z', baselineTo: '2099-02-01T00:00:00Z', reason: 'Stable period' });
    expect(empty.status).toBe(422);
    expect(empty.body).toEqual({ error: 'The baseline window holds no kept points' });
    const technician = await request(api.app).post(url).set(await as('technician')).send({ baselineFrom, baselineTo, reason: 'Stable period' });
    expect(technician.status).toBe(403);

    const reason = 'First 30 sets after the mixer service: stable, no assignable cause';
    const res = await request(api.app).post(url).set(h).send({ baselineFrom, baselineTo, reason });
    expect(res.status).toBe(201);
    const revision = res.body as LimitRevisionRecord;
    const book = xbarRLimits(baseline, 3);
    expect(revision).toMatchObject({ chartType: 'xbar-r', subgroupSize: 3, baselinePoints: 30, reason, createdByName: 'Demo Quality Manager', supersededAt: null });
    expect(revision.center).toBeCloseTo(book.center, 6);
    expect(Math.abs(revision.locationUcl - book.ucl)).toBeLessThan(0.01);

    const frozen = await chartOf(code);
    expect(frozen.limits).toMatchObject({ source: 'frozen', revisionId: revision.id, reason, frozenBy: 'Demo Quality Manager' });
    expect(frozen.limits.location.ucl).toBeCloseTo(revision.locationUcl, 9);
    // Every point, the later ones too, is judged against the frozen limits.
    expect(frozen.points.at(-1)!.ucl).toBeCloseTo(revision.locationUcl, 9);
    for (const v of frozen.violations.filter((x) => x.rule === 'we1' && x.chart === 'location')) {
      const p = frozen.points[v.index];
      expect(p.location > revision.locationUcl || p.location < revision.locationLcl).toBe(true);
    }

    const second = await request(api.app).post(url).set(h).send({ baselineFrom, baselineTo: before.points[59].producedAt, reason: 'Longer baseline of 60 sets' });
    expect(second.status).toBe(201);
    const history = await request(api.app).get(url).set(await as('auditor'));
    expect(history.status).toBe(200);
    const items = history.body.items as LimitRevisionRecord[];
    expect(items.map((r) => r.revision)).toEqual([revision.revision + 1, revision.revision, initial.revision]);
    expect(revision.revision).toBe(initial.revision + 1);
    expect(items[0].supersededAt).toBeNull();
    expect(items[1].supersededAt).not.toBeNull();
    expect(items[1].baselineFrom).toBe(new Date(baselineFrom).toISOString());
  });

  it('answers 404 for the history of an unknown characteristic', async () => {
    const res = await request(api.app).get('/api/v1/characteristics/999999/limit-revisions').set(await as('auditor'));
    expect(res.status).toBe(404);
  });
});

describe('characteristic list still answers beside the chart routes', () => {
  it('GET /api/v1/characteristics', async () => {
    const res = await request(api.app).get('/api/v1/characteristics').set(await as('technician'));
    expect(res.status).toBe(200);
    // The demo plant's: catalogue tests running beside this file add and remove their own meanwhile.
    expect(res.body.items.filter((c: { code: string }) => isDemoCode(c.code)).length).toBe([...ids.keys()].filter(isDemoCode).length);
    const [flow] = await api.db.select().from(characteristics).where(eq(characteristics.code, 'HVL25-FLOW'));
    expect(res.body.items.some((c: { id: number }) => c.id === flow.id)).toBe(true);
  });
});
