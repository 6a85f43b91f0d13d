// A characteristic's control chart as the chart page, the nightly run and the alarms see it, assembled
// from its loaded inputs (chart-load.ts): pure, no I/O, so a chart can be built from any inputs in a test.
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
import {
  computeCapability,
  computeChart,
  isOutOfSpec,
  lotResult,
  PHASE_ONE_MIN_POINTS,
  pointAt,
  ruleDescriptions,
  specAt,
  specVerdict,
  type CapabilityResult,
  type ChartResult,
  type ChartType,
  type RuleId,
  type RuleSetId,
  type SpecificationRevision,
} from '@shared/spc';
import type { CharacteristicChart, ChartPeriod, ChartPointRecord } from '@shared/schemas/charts';

export interface ChartWindow {
  from?: Date;
  to?: Date;
  /** The offered period the window stands for; without it, a window of from and to (or all history). */
  period?: ChartPeriod;
}

// The answer's shape is the one the web app reads (shared/schemas/charts.ts).
export type { CharacteristicChart };

export type CharacteristicRow = {
  id: number;
  code: string;
  name: string;
  unit: string;
  chart_type: ChartType;
  rule_set: RuleSetId;
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

/** A specification revision as loaded: its effective instant as a Date. */
export type SpecRevision = SpecificationRevision & { effectiveFrom: Date };

export interface LimitRevisionRow {
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
  /** The window the lots were read for; all history when absent. */
  window?: ChartWindow;
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

export interface Computed {
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
        outOfSpec: isOutOfSpec(specVerdict(lotResult(lot.values), specAt(inputs.specs, lot.producedAt))),
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
  const w = inputs.window ?? {};
  const chart: CharacteristicChart = {
    window: {
      period: w.period ?? (w.from || w.to ? 'custom' : 'all'),
      from: w.from?.toISOString() ?? null,
      to: w.to?.toISOString() ?? null,
      limitsFrom: inForce && inForce.chartType === c.chart_type ? inForce.baselineFrom.toISOString() : null,
    },
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
