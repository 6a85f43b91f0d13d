// Speed of the SPC engine, each figure a ratio to a baseline measured in the same process on the same
// data, so that the machine's own speed cancels out. Not a test: `npm run bench` prints the table.
import { andersonDarling, computeCapability, computeChart, type ChartResult } from '@shared/spc';

interface BenchRow {
  name: string;
  ratio: number;
  target: string;
  detail: string;
}

/** Deterministic normal values (mulberry32 + Box–Muller): 1-day strength around 32 MPa. */
function normalValues(count: number, seed: number, mean: number, sd: number): Float64Array {
  let state = seed >>> 0;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = Math.imul(state ^ (state >>> 15), 1 | state);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  const out = new Float64Array(count);
  for (let i = 0; i < count; i += 2) {
    const r = Math.sqrt(-2 * Math.log(uniform()));
    const a = 2 * Math.PI * uniform();
    out[i] = mean + sd * r * Math.cos(a);
    if (i + 1 < count) out[i + 1] = mean + sd * r * Math.sin(a);
  }
  return out;
}

let sink = 0;

/** The baseline: one pass computing the sum and the sum of squares. */
function sumAndSquares(x: Float64Array): void {
  let s = 0;
  let q = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    s += v;
    q += v * v;
  }
  sink += s + q;
}

/**
 * Fastest and median times of `work` and `baseline`, run alternately after a warm-up. The ratio uses
 * the fastest runs: on a shared machine the other processes only ever add time.
 */
function compare(work: () => void, baseline: () => void, rounds: number): { work: number; baseline: number; workMedian: number; baselineMedian: number } {
  for (let i = 0; i < 2; i++) {
    work();
    baseline();
  }
  const w: number[] = [];
  const b: number[] = [];
  for (let i = 0; i < rounds; i++) {
    let t = performance.now();
    work();
    w.push(performance.now() - t);
    t = performance.now();
    baseline();
    b.push(performance.now() - t);
  }
  w.sort((x, y) => x - y);
  b.sort((x, y) => x - y);
  const mid = Math.floor(rounds / 2);
  return { work: w[0], baseline: b[0], workMedian: w[mid], baselineMedian: b[mid] };
}

/** Bytes of the typed arrays a chart result holds beyond the input once every column has been read
 *  (I–MR builds its moving ranges on first read), plus its violation records. */
function retainedBytes(result: ChartResult, input: Float64Array): number {
  const p = result.points;
  const arrays = [p.location, p.dispersion, p.hasDispersion, p.excluded, p.size, ...(p.perPoint ? Object.values(p.perPoint) : [])];
  let bytes = 0;
  for (const a of arrays) if (a !== null && a !== input) bytes += a.byteLength;
  // A violation: an object of four fields and a small array of point indices (V8, 64-bit, estimated).
  for (const v of result.violations) bytes += 48 + 16 + 8 * v.points.length;
  return bytes;
}

const fmt = (ms: number): string => `${ms.toFixed(2)} ms`;
const times = (t: { work: number; baseline: number; workMedian: number; baselineMedian: number }): string =>
  `fastest ${fmt(t.work)} vs ${fmt(t.baseline)}, median ${fmt(t.workMedian)} vs ${fmt(t.baselineMedian)}`;

export async function run(): Promise<BenchRow[]> {
  const rows: BenchRow[] = [];
  const individuals = normalValues(1_000_000, 20240601, 32, 1.5);

  let imr: ChartResult | undefined;
  const t1 = compare(
    () => {
      imr = computeChart({ values: individuals, chart: 'imr', rules: 'extended' });
      const cap = computeCapability({ values: individuals, sigmaWithin: imr.sigmaWithin, lsl: 27, usl: 37, normality: false });
      sink += cap.cpk ?? 0;
    },
    () => sumAndSquares(individuals),
    15,
  );
  const imrResult = imr as ChartResult;
  rows.push({
    name: 'spc: I–MR, 8 rules + Cp/Cpk/Pp/Ppk, 1,000,000 values',
    ratio: t1.work / t1.baseline,
    target: '≤ 15; memory ≤ 2 × input',
    detail: `${times(t1)} (baseline: sum and sum of squares); ${imrResult.violations.length} violations; retained ${(retainedBytes(imrResult, individuals) / individuals.byteLength).toFixed(2)} × input`,
  });

  const subgrouped = normalValues(1_000_000, 19561231, 32, 1.5);
  let xbar: ChartResult | undefined;
  const t2 = compare(() => { xbar = computeChart({ values: subgrouped, subgroupSize: 5, chart: 'xbar-r' }); }, () => sumAndSquares(subgrouped), 15);
  const xbarResult = xbar as ChartResult;
  rows.push({
    name: 'spc: X̄–R, 4 rules, 200,000 subgroups of 5',
    ratio: t2.work / t2.baseline,
    target: '≤ 15; memory ≤ 2 × input',
    detail: `${times(t2)}; ${xbarResult.violations.length} violations; retained ${(retainedBytes(xbarResult, subgrouped) / subgrouped.byteLength).toFixed(2)} × input`,
  });

  const t3 = compare(
    () => { sink += andersonDarling(individuals).p ?? 0; },
    () => { sink += individuals.slice().sort()[0]; },
    7,
  );
  rows.push({
    name: 'spc: Anderson–Darling normality, 1,000,000 values',
    ratio: t3.work / t3.baseline,
    target: '≤ 2 (vs sorting a copy)',
    detail: `${times(t3)} (baseline: copy and sort of the Float64Array)`,
  });
  if (sink === 42) rows.push({ name: 'unreachable', ratio: 0, target: '', detail: '' });
  return rows;
}
