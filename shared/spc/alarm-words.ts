// Alarms in words a manager reads: which figure of which chart, against which limit, always to the
// characteristic's own decimals. The rule identifiers (we1 …) are for code only and never appear here.
import { formatFigure, formatQuantity } from '../figures';
import type { ChartType } from './charts';
import { ruleDescriptions, type RuleId } from './rules';

/** Short names of the signals, in the trade's words. */
export const signalNames: Record<string, string> = {
  'out-of-spec': 'Out of specification',
  we1: 'Beyond a control limit',
  we2: 'Two of three beyond 2 sigma',
  we3: 'Four of five beyond 1 sigma',
  we4: 'Eight on one side of the centre line',
  trend: 'Six in a row rising or falling',
  alternating: 'Fourteen alternating up and down',
  hugging: 'Fifteen within 1 sigma',
  mixture: 'Eight beyond 1 sigma on both sides',
  capability: 'Capability below threshold',
};

/** The signal's short name; an unknown rule reads as a plain "signal", never as its identifier. */
export const signalName = (rule: string): string => signalNames[rule] ?? 'Chart signal';

/**
 * How urgent a signal is this morning, smallest first: a lot outside its specification, then a point
 * beyond a control limit, then the patterns of the run rules.
 */
export const signalRank = (rule: string): number => (rule === 'out-of-spec' ? 0 : rule === 'we1' ? 1 : 2);

/** What a point of the chart is, in words: "subgroup mean", "subgroup range", "individual value", … */
export function statisticWords(chartType: ChartType, chart: 'location' | 'dispersion'): string {
  if (chart === 'location') return chartType === 'imr' ? 'individual value' : 'subgroup mean';
  return chartType === 'xbar-r' ? 'subgroup range' : chartType === 'xbar-s' ? 'subgroup standard deviation' : 'moving range';
}

export const limitWords: Record<string, string> = {
  UCL: 'upper control limit',
  LCL: 'lower control limit',
  USL: 'upper specification limit',
  LSL: 'lower specification limit',
};

/** The facts one sentence needs: the signal, the chart's figure and the limit of the same chart. */
export interface AlarmWordsInput {
  rule: string;
  chart: 'location' | 'dispersion';
  chartType: ChartType;
  statistic: number;
  values: readonly number[];
  limitName: string | null;
  limitValue: number | null;
  unit: string;
  decimals: number;
  /** Specification revision of an out-of-specification alarm. */
  specRevision?: number | null;
}

/** The facts of a falling-capability alarm: the index compared, its value, the threshold and the window. */
export interface CapabilityWordsInput {
  /** Cpk, or Ppk where the chart of the window is not in control. */
  index: 'Cpk' | 'Ppk';
  value: number;
  threshold: number;
  /** Lots and values of the window the index was computed over. */
  lots: number;
  values: number;
  fromLot: string;
  toLot: string;
}

/**
 * The sentence of a falling-capability alarm, e.g. "Cpk 1.12 over the newest 60 lots (L1-0001 to
 * L1-0060, 120 results) fell below the threshold 1.33." Indices read to two decimals (common practice).
 */
export function capabilitySentence(c: CapabilityWordsInput): string {
  const why = c.index === 'Ppk' ? ' The chart of these lots is not in statistical control, so the performance index Ppk stands in for Cpk.' : '';
  return `${c.index} ${formatFigure(c.value, 2)} over the newest ${c.lots} lots (${c.fromLot} to ${c.toLot}, ${c.values} results) fell below the threshold ${formatFigure(c.threshold, 2)}.${why}`;
}

/**
 * One sentence of what the chart shows at the lot, e.g. "Subgroup mean 1,501 kg/m³ above the upper
 * control limit 1,490 kg/m³." The limit is always the one of the chart the figure is plotted on.
 */
export function alarmSentence(a: AlarmWordsInput): string {
  const places = comparablePlaces(a.statistic, a.limitValue, a.decimals);
  const q = (v: number) => formatQuantity(v, places, a.unit);
  const side = (limit: string | null) => (limit === 'UCL' || limit === 'USL' ? 'above the' : 'below the');
  if (a.rule === 'out-of-spec') {
    const of = a.values.length > 1 ? ` (mean of ${a.values.length} results: ${a.values.map((v) => formatFigure(v, a.decimals)).join(', ')})` : '';
    const limit = a.limitName && a.limitValue !== null ? ` ${side(a.limitName)} ${limitWords[a.limitName]} ${q(a.limitValue)}` : ' outside the specification';
    const revision = a.specRevision ? ` (specification revision ${a.specRevision})` : '';
    return `Lot result ${q(a.statistic)}${of}${limit}${revision}.`;
  }
  const figure = statisticWords(a.chartType, a.chart);
  if (a.rule === 'we1' && a.limitName && a.limitValue !== null) {
    return `${capitalise(figure)} ${q(a.statistic)} ${side(a.limitName)} ${limitWords[a.limitName]} ${q(a.limitValue)}.`;
  }
  const pattern = ruleDescriptions[a.rule as RuleId] ?? 'The chart shows a pattern of points.';
  return `${pattern} The pattern is complete at this lot, ${figure} ${q(a.statistic)}.`;
}

/**
 * The characteristic's decimals, or as few more as it takes for a figure and the limit it broke to
 * read differently: "13.9 MPa above the upper control limit 13.9 MPa" would contradict itself.
 */
function comparablePlaces(value: number, limit: number | null, decimals: number): number {
  if (limit === null) return decimals;
  for (let d = decimals; d < decimals + 3; d++) if (formatFigure(value, d) !== formatFigure(limit, d)) return d;
  return decimals + 3;
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
