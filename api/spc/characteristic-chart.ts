// A characteristic's control chart as the chart page, the nightly run and the alarms see it.
//
// - One point per lot, in production order (lots.produced_at, then lot number): a 28-day result is
//   plotted at its lot's position, not at its test date.
// - The subgroup is the lot's live (not voided) replicates. An I–MR characteristic charts the lot's
//   result, the mean of its replicates, so that a point is always a lot.
// - Limits: a frozen revision (phase II) judges the points from the start of its baseline on, until
//   a later revision's baseline starts, so revising the limits after a process change leaves the
//   points before it judged by the limits of their time (common practice: limits are revised from
//   the new level onward, never back over data they were not computed from). Points before any
//   revision's baseline get trial limits of their own (phase I). Run rules start afresh at each
//   change of limits: a run counted against one centre line means nothing against another.
// - Out of specification: the lot's result — the mean of its replicates, as EN 196-1 reports a
//   strength set by its mean (from memory) — against the specification revision in force at the lot's
//   production time. A result exactly on a limit is inside.
// - Capability: the kept values of the window against the specification in force now, with the
//   window's own sigma within (even in phase II, so that it describes the period, not the baseline).
import { createHash } from 'node:crypto';
import { and, desc, eq, isNull, sql } from 'drizzle-orm';
import { computeCapability, computeChart, pointAt, ruleDescriptions, type CapabilityResult, type ChartResult, type ChartType, type RuleId } from '@shared/spc';
import { recordAudit } from '../db/audit';
import type { Database } from '../db/client';
import { controlLimitRevisions, lots, measurements, pointExclusions, users } from '../db/schema';
import { HttpError, notFound } from '../http/errors';
import type { Executor } from './db';
import type { CharacteristicChart, ChartPointRecord } from '@shared/schemas/charts';

/** Fewer subgroups than this give preliminary trial limits (common practice: 20 to 25 subgroups). */
export const PHASE_ONE_MIN_POINTS = 20;

export interface ChartWindow {
  from?: Date;
  to?: Date;
}

// The answer's shape is the one the web app reads (shared/schemas/charts.ts).
export type { CharacteristicChart };

type CharacteristicRow = {
  id: number;
  code: string;
  name: string;
  unit: string;
  chart_type: ChartType;
  rule_set: 'we' | 'extended';
  subgroup_size: number;
  product_id: number;
  product_code: string;
  product_name: string;
  plant_id: number;
  line_id: number | null;
  line_code: string | null;
  decimals: number;
};

export interface LotSubgroup {
  lotId: number;
  lotNumber: string;
  producedAt: Date;
  shift: string | null;
  values: number[];
  /** When the newest of the lot's live values was stored. */
  lastEnteredAt: Date;
}

interface SpecRevision {
  revision: number;
  lsl: number | null;
  usl: number | null;
  target: number | null;
  effectiveFrom: Date;
}

interface LimitRevisionRow {
  id: number;
  revision: number;
  chartType: ChartType;
  center: number;
  sigmaWithin: number;
  baselineFrom: Date;
  baselineTo: Date;
  createdAt: Date;
  createdByName: string | null;
  reason: string;
}

/** Everything a chart is computed from, read in one go (inside the run's transaction). */
export interface ChartInputs {
  characteristic: CharacteristicRow;
  lots: LotSubgroup[];
  exclusions: Map<number, string>;
  /** Every frozen-limit revision of the characteristic, oldest first; the last one is in force. */
  revisions: LimitRevisionRow[];
  specs: SpecRevision[];
  events: CharacteristicChart['events'];
  now: Date;
}

type MetaRow = CharacteristicRow & {
  exclusions: { lotId: number; reason: string }[] | null;
  revisions: { id: number; revision: number; chartType: ChartType; center: number; sigmaWithin: number; baselineFrom: string; baselineTo: string; createdAt: string; createdByName: string | null; reason: string }[] | null;
  specs: { revision: number; lsl: number | null; usl: number | null; target: number | null; effectiveFrom: string }[] | null;
};

/**
 * Reads a characteristic's chart inputs: its settings, exclusions, limit revision and
 * specifications in one query, its values in a second, and (unless left out) the process events.
 */
export async function loadChartInputs(db: Executor, characteristicId: number, window: ChartWindow = {}, now = new Date(), opts: { events?: boolean } = {}): Promise<ChartInputs | null> {
  const meta = await db.execute<MetaRow>(sql`
    select c.id, c.code, c.name, c.unit, c.chart_type, c.rule_set, c.subgroup_size, p.id as product_id, p.code as product_code,
           p.name as product_name, p.plant_id, p.line_id, pl.code as line_code, tm.decimals,
           (select json_agg(json_build_object('lotId', e.lot_id, 'reason', e.reason)) from point_exclusions e
             where e.characteristic_id = c.id and e.removed_at is null) as exclusions,
           (select json_agg(json_build_object('id', r.id, 'revision', r.revision, 'chartType', r.chart_type, 'center', r.center, 'sigmaWithin', r.sigma_within,
                                              'baselineFrom', r.baseline_from, 'baselineTo', r.baseline_to, 'createdAt', r.created_at, 'createdByName', u.name, 'reason', r.reason)
                            order by r.revision)
             from control_limit_revisions r left join users u on u.id = r.created_by
             where r.characteristic_id = c.id) as revisions,
           (select json_agg(json_build_object('revision', s.revision, 'lsl', s.lsl, 'usl', s.usl, 'target', s.target, 'effectiveFrom', s.effective_from)
                            order by s.effective_from, s.revision)
             from spec_limits s where s.characteristic_id = c.id) as specs
    from characteristics c
    join products p on p.id = c.product_id
    join test_methods tm on tm.id = c.test_method_id
    left join production_lines pl on pl.id = p.line_id
    where c.id = ${characteristicId}`);
  const row = meta.rows[0];
  if (!row) return null;
  const { exclusions, revisions, specs, ...characteristic } = row;

  const from = window.from ? sql`and l.produced_at >= ${window.from.toISOString()}::timestamptz` : sql``;
  const to = window.to ? sql`and l.produced_at <= ${window.to.toISOString()}::timestamptz` : sql``;
  // One row per value, grouped into lots here. The lateral lookup (kept apart by OFFSET 0) reads
  // only the characteristic's own lots by primary key instead of hashing every lot of the plant.
  const valueRows = await db.execute<{ lot_id: number; lot_number: string; produced_ms: number; shift: string | null; value: number; entered_ms: number }>(sql`
    select m.lot_id, l.lot_number, (extract(epoch from l.produced_at) * 1000)::float8 as produced_ms, l.shift, m.value,
           (extract(epoch from m.created_at) * 1000)::float8 as entered_ms
    from measurements m cross join lateral (select lot_number, produced_at, shift from lots where id = m.lot_id offset 0) l
    where m.characteristic_id = ${characteristicId} and m.voided_at is null ${from} ${to}
    order by l.produced_at, l.lot_number collate "C", m.replicate`);
  const lotsOut: LotSubgroup[] = [];
  let current: LotSubgroup | null = null;
  for (const r of valueRows.rows) {
    if (current === null || current.lotId !== r.lot_id) {
      current = { lotId: r.lot_id, lotNumber: r.lot_number, producedAt: new Date(Number(r.produced_ms)), shift: r.shift, values: [], lastEnteredAt: new Date(Number(r.entered_ms)) };
      lotsOut.push(current);
    }
    current.values.push(Number(r.value));
    const entered = Number(r.entered_ms);
    if (entered > current.lastEnteredAt.getTime()) current.lastEnteredAt = new Date(entered);
  }

  const eventsFrom = window.from ?? lotsOut[0]?.producedAt ?? null;
  const eventsTo = window.to ?? now;
  const eventRows =
    opts.events !== false && eventsFrom
      ? await db.execute<{ id: number; occurred_at: Date; title: string; description: string | null }>(sql`
          select id, occurred_at, title, description from process_events
          where plant_id = ${characteristic.plant_id}
            and (line_id is null or line_id = ${characteristic.line_id})
            and (product_id is null or product_id = ${characteristic.product_id})
            and occurred_at >= ${eventsFrom.toISOString()}::timestamptz and occurred_at <= ${eventsTo.toISOString()}::timestamptz
          order by occurred_at, id`)
      : { rows: [] };

  return {
    characteristic,
    lots: lotsOut,
    exclusions: new Map((exclusions ?? []).map((e) => [e.lotId, e.reason])),
    revisions: (revisions ?? []).map((r) => ({ ...r, baselineFrom: new Date(r.baselineFrom), baselineTo: new Date(r.baselineTo), createdAt: new Date(r.createdAt) })),
    specs: (specs ?? []).map((s) => ({ revision: s.revision, lsl: s.lsl, usl: s.usl, target: s.target, effectiveFrom: new Date(s.effectiveFrom) })),
    events: eventRows.rows.map((e) => ({ id: e.id, occurredAt: new Date(e.occurred_at).toISOString(), title: e.title, description: e.description })),
    now,
  };
}

/** The revision in force at `at`: the latest effective one, the higher revision on a tie. */
export function specAt(specs: SpecRevision[], at: Date): SpecRevision | null {
  let found: SpecRevision | null = null;
  for (const s of specs) if (s.effectiveFrom.getTime() <= at.getTime()) found = s;
  return found;
}

export const lotResult = (values: number[]) => values.reduce((a, b) => a + b, 0) / values.length;

export function isOutOfSpec(result: number, spec: SpecRevision | null): boolean {
  if (!spec) return false;
  return (spec.lsl !== null && result < spec.lsl) || (spec.usl !== null && result > spec.usl);
}

/** Hash of everything the chart depends on: equal hashes mean an identical chart. */
export function chartFingerprint(inputs: ChartInputs): string {
  const h = createHash('sha256');
  const c = inputs.characteristic;
  h.update(JSON.stringify([c.chart_type, c.rule_set, inputs.revisions.map((r) => r.id), inputs.specs, [...inputs.exclusions.keys()].sort((a, b) => a - b)]));
  const ids = new Int32Array(inputs.lots.length);
  let valueCount = 0;
  for (const lot of inputs.lots) valueCount += lot.values.length + 1;
  const vals = new Float64Array(valueCount);
  let at = 0;
  inputs.lots.forEach((lot, i) => {
    ids[i] = lot.lotId;
    vals[at++] = lot.values.length;
    for (const v of lot.values) vals[at++] = v;
  });
  h.update(new Uint8Array(ids.buffer));
  h.update(new Uint8Array(vals.buffer));
  return h.digest('hex');
}

interface Computed {
  chart: CharacteristicChart;
  /** The result of the newest stretch of points (all of them with no frozen revision): the headline limits. */
  result: ChartResult;
}

/** A run of consecutive points judged against one set of limits. */
interface Stretch {
  from: number;
  to: number;
  revision: LimitRevisionRow | null;
}

/**
 * Which limits judge which points: each revision from the start of its baseline until a later
 * revision's baseline starts (a later revision whose baseline starts earlier takes over from there),
 * trial limits before the first. Returns the stretches in point order.
 */
function stretchesOf(lotsIn: LotSubgroup[], revisions: LimitRevisionRow[]): Stretch[] {
  const spans: { from: number; revision: LimitRevisionRow }[] = [];
  let until = Infinity;
  for (let k = revisions.length - 1; k >= 0; k--) {
    const from = revisions[k].baselineFrom.getTime();
    if (from >= until) continue;
    spans.unshift({ from, revision: revisions[k] });
    until = from;
  }
  if (lotsIn.length === 0) return [{ from: 0, to: 0, revision: spans.at(-1)?.revision ?? null }];
  const out: Stretch[] = [];
  let span = -1;
  lotsIn.forEach((lot, i) => {
    const t = lot.producedAt.getTime();
    while (span + 1 < spans.length && spans[span + 1].from <= t) span++;
    const revision = span >= 0 ? spans[span].revision : null;
    const last = out.at(-1);
    if (last && last.revision === revision) last.to = i + 1;
    else out.push({ from: i, to: i + 1, revision });
  });
  return out;
}

/** Pure part: the chart from its loaded inputs. */
export function buildChart(inputs: ChartInputs): Computed {
  const c = inputs.characteristic;
  const reasons: string[] = [];
  const lotsIn = inputs.lots;
  const imr = c.chart_type === 'imr';
  const subgroups = lotsIn.map((l) => (imr ? [lotResult(l.values)] : l.values));
  const excluded: number[] = [];
  lotsIn.forEach((l, i) => {
    if (inputs.exclusions.has(l.lotId)) excluded.push(i);
  });

  const trial = computeChart({ subgroups, chart: c.chart_type, excluded, rules: c.rule_set });
  const inForce = inputs.revisions.at(-1) ?? null;
  let stretches: Stretch[] = [{ from: 0, to: lotsIn.length, revision: null }];
  if (inForce && inForce.chartType !== c.chart_type) {
    reasons.push(`The frozen limits (revision ${inForce.id}) belong to the ${inForce.chartType} chart but the characteristic is now charted as ${c.chart_type}, so trial limits are shown until limits are frozen again.`);
  } else if (inForce) {
    stretches = stretchesOf(lotsIn, inputs.revisions.filter((r) => r.chartType === c.chart_type));
  }

  const results = stretches.map((s) => {
    if (s.revision === null && s.from === 0 && s.to === lotsIn.length) return trial;
    const own = excluded.filter((i) => i >= s.from && i < s.to).map((i) => i - s.from);
    const frozen = s.revision ? { chart: s.revision.chartType, center: s.revision.center, sigmaWithin: s.revision.sigmaWithin } : undefined;
    return computeChart({ subgroups: subgroups.slice(s.from, s.to), chart: c.chart_type, excluded: own, rules: c.rule_set, frozen });
  });
  for (const r of results) for (const reason of r.reasons) reasons.push(reason.message);
  const last = stretches.length - 1;
  const result = results[last];
  const rev = stretches[last].revision;
  const frozenUsed = rev !== null;
  if (stretches.length > 1 && stretches[0].revision === null) {
    const n = stretches[0].to - stretches[0].from;
    reasons.push(`The ${n} point(s) before the baseline of the first frozen limits are judged against trial limits of their own.`);
  }

  const keptPoints = lotsIn.length - excluded.length;
  if (!frozenUsed && lotsIn.length > 0 && keptPoints < PHASE_ONE_MIN_POINTS) {
    reasons.push(`Only ${keptPoints} kept point(s): trial limits from fewer than ${PHASE_ONE_MIN_POINTS} subgroups are preliminary and may move a lot as results come in.`);
  }

  const specNow = specAt(inputs.specs, inputs.now);
  if (!specNow || (specNow.lsl === null && specNow.usl === null)) {
    reasons.push('No specification limit is in force, so results are not judged against a specification and capability indices are not given.');
  }

  const violations: CharacteristicChart['violations'] = [];
  const ruleAt = new Map<number, RuleId[]>();
  stretches.forEach((s, k) => {
    for (const v of results[k].violations) {
      const index = v.index + s.from;
      violations.push({ rule: v.rule, chart: v.chart, index, points: v.points.map((i) => i + s.from), description: ruleDescriptions[v.rule] });
      const list = ruleAt.get(index) ?? [];
      if (!list.includes(v.rule)) list.push(v.rule);
      ruleAt.set(index, list);
    }
  });

  const points: ChartPointRecord[] = [];
  stretches.forEach((s, k) => {
    for (let i = s.from; i < s.to; i++) {
      const lot = lotsIn[i];
      const p = pointAt(results[k], i - s.from);
      points.push({
        index: i,
        lotId: lot.lotId,
        lotNumber: lot.lotNumber,
        producedAt: lot.producedAt.toISOString(),
        shift: lot.shift,
        n: lot.values.length,
        values: lot.values,
        location: p.location,
        dispersion: p.dispersion,
        center: p.locationLimits.center,
        ucl: p.locationLimits.ucl,
        lcl: p.locationLimits.lcl,
        dispersionUcl: p.dispersionLimits.ucl,
        dispersionLcl: p.dispersionLimits.lcl,
        excluded: p.excluded,
        exclusionReason: inputs.exclusions.get(lot.lotId) ?? null,
        outOfSpec: isOutOfSpec(lotResult(lot.values), specAt(inputs.specs, lot.producedAt)),
        rules: ruleAt.get(i) ?? [],
      });
    }
  });

  let capability: CapabilityResult | null = null;
  if (keptPoints > 0) {
    const kept: number[] = [];
    lotsIn.forEach((lot, i) => {
      if (inputs.exclusions.has(lot.lotId)) return;
      if (imr) kept.push(subgroups[i][0]);
      else for (const v of lot.values) kept.push(v);
    });
    capability = computeCapability({ values: kept, sigmaWithin: trial.sigmaWithin, lsl: specNow?.lsl, usl: specNow?.usl, target: specNow?.target, subgroupCount: keptPoints });
    for (const n of capability.notes) if (n.code !== 'no-spec' && n.code !== 'no-data') reasons.push(n.message);
  }

  const z = result.location.zones;
  const chart: CharacteristicChart = {
    characteristic: {
      id: c.id,
      code: c.code,
      name: c.name,
      unit: c.unit,
      chartType: c.chart_type,
      ruleSet: c.rule_set,
      subgroupSize: c.subgroup_size,
      productCode: c.product_code,
      productName: c.product_name,
      lineCode: c.line_code,
      decimals: c.decimals,
    },
    spec: specNow ? { lsl: specNow.lsl, usl: specNow.usl, target: specNow.target, revision: specNow.revision } : null,
    limits: {
      source: frozenUsed ? 'frozen' : 'trial',
      revisionId: frozenUsed ? rev!.id : null,
      baselineFrom: frozenUsed ? rev!.baselineFrom.toISOString() : (lotsIn[0]?.producedAt.toISOString() ?? null),
      baselineTo: frozenUsed ? rev!.baselineTo.toISOString() : (lotsIn.at(-1)?.producedAt.toISOString() ?? null),
      frozenAt: frozenUsed ? rev!.createdAt.toISOString() : null,
      frozenBy: frozenUsed ? rev!.createdByName : null,
      reason: frozenUsed ? rev!.reason : null,
      location: { center: result.location.center, ucl: result.location.ucl, lcl: result.location.lcl, sigma: result.location.sigma },
      dispersion: { center: result.dispersion.center, ucl: result.dispersion.ucl, lcl: result.dispersion.lcl },
      zones: z ? { plus1: z.plusOne, plus2: z.plusTwo, minus1: z.minusOne, minus2: z.minusTwo } : null,
      sigmaWithin: result.sigmaWithin,
      sigmaOverall: trial.sigmaOverall,
    },
    points,
    violations,
    events: inputs.events,
    capability,
    reasons: [...new Set(reasons)],
  };
  return { chart, result };
}

/** The chart of one characteristic over a window of production dates (all of it by default). */
export async function computeCharacteristicChart(db: Executor, characteristicId: number, window: ChartWindow = {}): Promise<CharacteristicChart> {
  const inputs = await loadChartInputs(db, characteristicId, window);
  if (!inputs) throw notFound(`Characteristic ${characteristicId}`);
  return buildChart(inputs).chart;
}

export interface LimitRevision {
  id: number;
  revision: number;
  chartType: ChartType;
  subgroupSize: number;
  center: number;
  sigmaWithin: number;
  locationUcl: number;
  locationLcl: number;
  dispersionCenter: number | null;
  dispersionUcl: number | null;
  dispersionLcl: number | null;
  baselineFrom: Date;
  baselineTo: Date;
  baselinePoints: number;
  reason: string;
  createdBy: number | null;
  createdByName: string | null;
  createdAt: Date;
  supersededAt: Date | null;
}

/** Every frozen-limit revision of a characteristic, newest first. */
export async function limitRevisions(db: Executor, characteristicId: number): Promise<LimitRevision[]> {
  return db
    .select({
      id: controlLimitRevisions.id,
      revision: controlLimitRevisions.revision,
      chartType: controlLimitRevisions.chartType,
      subgroupSize: controlLimitRevisions.subgroupSize,
      center: controlLimitRevisions.center,
      sigmaWithin: controlLimitRevisions.sigmaWithin,
      locationUcl: controlLimitRevisions.locationUcl,
      locationLcl: controlLimitRevisions.locationLcl,
      dispersionCenter: controlLimitRevisions.dispersionCenter,
      dispersionUcl: controlLimitRevisions.dispersionUcl,
      dispersionLcl: controlLimitRevisions.dispersionLcl,
      baselineFrom: controlLimitRevisions.baselineFrom,
      baselineTo: controlLimitRevisions.baselineTo,
      baselinePoints: controlLimitRevisions.baselinePoints,
      reason: controlLimitRevisions.reason,
      createdBy: controlLimitRevisions.createdBy,
      createdByName: users.name,
      createdAt: controlLimitRevisions.createdAt,
      supersededAt: controlLimitRevisions.supersededAt,
    })
    .from(controlLimitRevisions)
    .leftJoin(users, eq(users.id, controlLimitRevisions.createdBy))
    .where(eq(controlLimitRevisions.characteristicId, characteristicId))
    .orderBy(desc(controlLimitRevisions.revision));
}

/** Serialises changes to one characteristic's limits and exclusions (and its run job). */
export const CHARACTERISTIC_LOCK = 727_005;

const requireReason = (reason: string) => {
  if (!reason || !reason.trim()) throw new HttpError(400, 'reason: say why, for the audit trail');
  return reason.trim();
};

export interface FreezeRequest {
  characteristicId: number;
  baselineFrom: Date;
  baselineTo: Date;
  reason: string;
  userId: number;
}

/**
 * Freezes phase I limits from a baseline window (exclusions left out) as the new revision in force;
 * the previous revision is superseded, not changed.
 */
export async function freezeLimits(db: Database, req: FreezeRequest): Promise<LimitRevision> {
  const reason = requireReason(req.reason);
  if (!(req.baselineFrom.getTime() <= req.baselineTo.getTime())) throw new HttpError(400, 'baselineFrom must not be after baselineTo');
  const id = await db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${CHARACTERISTIC_LOCK}, ${req.characteristicId})`);
    const inputs = await loadChartInputs(tx, req.characteristicId, { from: req.baselineFrom, to: req.baselineTo });
    if (!inputs) throw notFound(`Characteristic ${req.characteristicId}`);
    const { result } = buildChart({ ...inputs, revisions: [] });
    const kept = inputs.lots.filter((l) => !inputs.exclusions.has(l.lotId)).length;
    if (kept === 0) throw new HttpError(422, 'The baseline window holds no kept points');
    if (result.sigmaWithin === null || result.location.center === null || result.location.ucl === null || result.location.lcl === null) {
      throw new HttpError(422, `Limits cannot be frozen from this baseline: ${result.reasons.map((r) => r.message).join(' ') || 'sigma within cannot be estimated.'}`);
    }
    if (result.sigmaWithin === 0) throw new HttpError(422, 'The baseline shows no variation within subgroups, so frozen limits would collapse onto the centre line');
    const [previous] = await tx
      .select({ id: controlLimitRevisions.id, revision: controlLimitRevisions.revision, center: controlLimitRevisions.center, sigmaWithin: controlLimitRevisions.sigmaWithin })
      .from(controlLimitRevisions)
      .where(eq(controlLimitRevisions.characteristicId, req.characteristicId))
      .orderBy(desc(controlLimitRevisions.revision))
      .limit(1);
    await tx
      .update(controlLimitRevisions)
      .set({ supersededAt: sql`now()` })
      .where(and(eq(controlLimitRevisions.characteristicId, req.characteristicId), isNull(controlLimitRevisions.supersededAt)));
    const [row] = await tx
      .insert(controlLimitRevisions)
      .values({
        characteristicId: req.characteristicId,
        revision: (previous?.revision ?? 0) + 1,
        chartType: result.chart,
        subgroupSize: result.limitsSubgroupSize,
        center: result.location.center,
        sigmaWithin: result.sigmaWithin,
        locationUcl: result.location.ucl,
        locationLcl: result.location.lcl,
        dispersionCenter: result.dispersion.center,
        dispersionUcl: result.dispersion.ucl,
        dispersionLcl: result.dispersion.lcl,
        baselineFrom: req.baselineFrom,
        baselineTo: req.baselineTo,
        baselinePoints: kept,
        reason,
        createdBy: req.userId,
      })
      .returning({ id: controlLimitRevisions.id, revision: controlLimitRevisions.revision });
    await recordAudit(tx, {
      actorId: req.userId,
      action: 'freeze limits',
      entity: 'characteristic',
      entityId: req.characteristicId,
      before: previous ? { revision: previous.revision, center: previous.center, sigmaWithin: previous.sigmaWithin } : null,
      after: { revision: row.revision, center: result.location.center, sigmaWithin: result.sigmaWithin, ucl: result.location.ucl, lcl: result.location.lcl, baselinePoints: kept },
      reason,
    });
    return row.id;
  });
  const all = await limitRevisions(db, req.characteristicId);
  return all.find((r) => r.id === id)!;
}

export interface PointRequest {
  characteristicId: number;
  lotId: number;
  reason: string;
  userId: number;
}

/** Leaves a lot's point out of the limits and the run rules of one characteristic (still plotted). */
export async function excludePoint(db: Database, req: PointRequest): Promise<{ id: number }> {
  const reason = requireReason(req.reason);
  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${CHARACTERISTIC_LOCK}, ${req.characteristicId})`);
    const [live] = await tx
      .select({ n: sql<number>`count(*)::int` })
      .from(measurements)
      .innerJoin(lots, eq(lots.id, measurements.lotId))
      .where(and(eq(measurements.characteristicId, req.characteristicId), eq(measurements.lotId, req.lotId), isNull(measurements.voidedAt)));
    if (!live || live.n === 0) throw notFound(`A point of lot ${req.lotId} on characteristic ${req.characteristicId}`);
    const [existing] = await tx
      .select({ id: pointExclusions.id })
      .from(pointExclusions)
      .where(and(eq(pointExclusions.characteristicId, req.characteristicId), eq(pointExclusions.lotId, req.lotId), isNull(pointExclusions.removedAt)));
    if (existing) throw new HttpError(409, 'This point is already excluded');
    const [row] = await tx.insert(pointExclusions).values({ characteristicId: req.characteristicId, lotId: req.lotId, reason, createdBy: req.userId }).returning({ id: pointExclusions.id });
    await recordAudit(tx, { actorId: req.userId, action: 'exclude point', entity: 'characteristic', entityId: req.characteristicId, after: { lotId: req.lotId, exclusionId: row.id }, reason });
    return row;
  });
}

/** Takes an excluded point back into the limits and run rules; the exclusion stays on record. */
export async function includePoint(db: Database, req: PointRequest): Promise<{ id: number }> {
  const reason = requireReason(req.reason);
  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${CHARACTERISTIC_LOCK}, ${req.characteristicId})`);
    const [row] = await tx
      .update(pointExclusions)
      .set({ removedAt: sql`now()`, removedBy: req.userId, removalReason: reason })
      .where(and(eq(pointExclusions.characteristicId, req.characteristicId), eq(pointExclusions.lotId, req.lotId), isNull(pointExclusions.removedAt)))
      .returning({ id: pointExclusions.id, reason: pointExclusions.reason });
    if (!row) throw notFound(`An exclusion of lot ${req.lotId} on characteristic ${req.characteristicId}`);
    await recordAudit(tx, { actorId: req.userId, action: 'include point', entity: 'characteristic', entityId: req.characteristicId, before: { lotId: req.lotId, exclusionId: row.id, reason: row.reason }, reason });
    return { id: row.id };
  });
}
