// What the overview says about one characteristic, from its chart over the whole history (control
// state against the limits the nightly run uses) and over the period (capability of recent production).
import type { CharacteristicChart } from '@shared/schemas/charts';
import { CPK_CAPABLE, CPK_MINIMUM, cpkFigure, type ControlState, type OverviewItem } from '@shared/schemas/overview';
import { PHASE_ONE_MIN_POINTS } from '@shared/spc';

/** Points of the period drawn in the overview's trend line; a longer period is drawn in as many groups. */
export const TREND_POINTS = 60;

/** Kept lots of the period below which the overview gives no capability: one lot says nothing of the process. */
export const CAPABILITY_MIN_LOTS = 2;


export interface OverviewBase {
  id: number;
  code: string;
  name: string;
  unit: string;
  decimals: number;
  chartType: OverviewItem['chartType'];
  productCode: string;
  productName: string;
  productFamily: string;
  lineCode: string | null;
  lineName: string | null;
}

export function summarise(base: OverviewBase, full: CharacteristicChart, recent: CharacteristicChart, from: Date, openAlarms: number): OverviewItem {
  const fromMs = from.getTime();
  const points = full.points;
  let firstInPeriod = points.length;
  while (firstInPeriod > 0 && Date.parse(points[firstInPeriod - 1].producedAt) >= fromMs) firstInPeriod--;
  const period = points.slice(firstInPeriod);
  const firstIndex = period.length ? period[0].index : Infinity;

  const signalAt = new Set<number>();
  for (const v of full.violations) if (v.index >= firstIndex) signalAt.add(v.index);

  const kept = points.reduce((n, p) => n + (p.excluded ? 0 : 1), 0);
  const limitsKnown = full.limits.location.ucl !== null && full.limits.location.lcl !== null;
  const enough = limitsKnown && (full.limits.source === 'frozen' || kept >= PHASE_ONE_MIN_POINTS);
  // An open alarm means someone still has to look: the card never says "in control" beside it.
  const controlState: ControlState =
    enough && period.length > 0 && signalAt.size > 0 ? 'signal' : openAlarms > 0 ? 'alarms-open' : !enough || period.length === 0 ? 'not-enough-data' : 'in-control';

  const outOfSpecCount = period.reduce((n, p) => n + (p.outOfSpec ? 1 : 0), 0);
  const latestPoint = points.at(-1) ?? null;
  const capability = recent.capability;
  const capabilityEnough = capability !== null && capability.subgroupCount >= CAPABILITY_MIN_LOTS;
  const cpk = capabilityEnough ? capability.cpk : null;

  const attention: string[] = [];
  let score = 0;
  if (latestPoint?.outOfSpec) {
    attention.push(`Latest lot ${latestPoint.lotNumber} is outside the specification`);
    score += 100;
  }
  if (openAlarms) {
    attention.push(`${openAlarms} open alarm${openAlarms === 1 ? '' : 's'}`);
    score += 20 * Math.min(openAlarms, 5);
  }
  if (controlState === 'signal') {
    attention.push(`Run-rule signal at ${signalAt.size} point${signalAt.size === 1 ? '' : 's'} in the period`);
    score += 40 + Math.min(signalAt.size, 20);
  }
  const earlierOutOfSpec = outOfSpecCount - (latestPoint?.outOfSpec && period.includes(latestPoint) ? 1 : 0);
  if (earlierOutOfSpec > 0) {
    attention.push(`${earlierOutOfSpec} ${latestPoint?.outOfSpec ? 'more ' : ''}lot${earlierOutOfSpec === 1 ? '' : 's'} outside the specification in the period`);
    score += 30;
  }
  if (cpk !== null && cpk < CPK_MINIMUM) {
    attention.push(`Cpk ${cpkFigure(cpk)} is below ${CPK_MINIMUM.toFixed(2)}`);
    score += 30;
  } else if (cpk !== null && cpk < CPK_CAPABLE) {
    attention.push(`Cpk ${cpkFigure(cpk)} is below ${CPK_CAPABLE.toFixed(2)}`);
    score += 15;
  }
  if (!enough || period.length === 0) {
    attention.push(period.length === 0 ? 'No lot in the period' : 'Not enough data for control limits');
    score += 5;
  }

  return {
    ...base,
    spec: full.spec ? { lsl: full.spec.lsl, usl: full.spec.usl, target: full.spec.target } : null,
    latest: latestPoint
      ? { lotNumber: latestPoint.lotNumber, producedAt: latestPoint.producedAt, location: latestPoint.location, n: latestPoint.n, outOfSpec: latestPoint.outOfSpec }
      : null,
    controlState,
    signals: signalAt.size,
    outOfSpecCount,
    pointsInPeriod: period.length,
    openAlarms,
    limitsSource: limitsKnown ? full.limits.source : null,
    cpk,
    cpkCi95: capabilityEnough ? capability.cpkCi95 : null,
    capabilityPreliminary: capability?.preliminary ?? true,
    capabilityEnough,
    trend: trendOf(period, signalAt),
    attention,
    attentionScore: score,
  };
}

/**
 * The period's points for the trend line, oldest first: every point while they are few, else groups of
 * neighbours, each drawn at its flagged point if it has one, so every signal and every lot outside the
 * specification the card counts keeps its mark.
 */
function trendOf(period: CharacteristicChart['points'], signalAt: Set<number>): OverviewItem['trend'] {
  const size = Math.max(1, Math.ceil(period.length / TREND_POINTS));
  const out: OverviewItem['trend'] = [];
  // Grouped from the newest back, so the newest point always ends the line.
  for (let end = period.length; end > 0; end -= size) {
    const group = period.slice(Math.max(0, end - size), end);
    const signal = group.some((p) => signalAt.has(p.index));
    const outOfSpec = group.some((p) => p.outOfSpec);
    const shown = group.find((p) => signalAt.has(p.index) || p.outOfSpec) ?? group[group.length - 1];
    out.push({ location: shown.location, signal, outOfSpec });
  }
  return out.reverse();
}
