// Command line for the SPC engine:
//   npm run --silent spc -- <file.csv> [--chart xbar-r|xbar-s|imr] [--lsl N] [--usl N] [--rules we|extended]
// Reads a CSV with a header row, a `value` column and an optional `subgroup` column, and prints one
// JSON document with the chart, its limits, points, run-rule violations and (given a specification
// limit) capability. Limits use the whole file as the baseline. Bad input: a message on stderr, exit 2.
import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import { computeCapability, computeChart, pointAt, SpcInputError, type CapabilityResult, type ChartResult, type ChartType } from '@shared/spc';

class UsageError extends Error {}

const USAGE = 'usage: npm run --silent spc -- <file.csv> [--chart xbar-r|xbar-s|imr] [--lsl N] [--usl N] [--rules we|extended]';

interface Options {
  file: string;
  chart?: ChartType;
  lsl?: number;
  usl?: number;
  rules: 'we' | 'extended';
}

/** A number as written in a lab export: optional sign, decimal point or decimal comma, exponent. */
function parseNumber(text: string): number | null {
  const t = text.trim();
  if (!/^[+-]?(\d+([.,]\d*)?|[.,]\d+)([eE][+-]?\d+)?$/.test(t)) return null;
  const v = Number(t.replace(',', '.'));
  return Number.isFinite(v) ? v : null;
}

function parseArgs(argv: string[]): Options {
  let file: string | undefined;
  const opts: Partial<Options> = { rules: 'we' };
  for (let i = 0; i < argv.length; i++) {
    let arg = argv[i];
    let inline: string | undefined;
    const eq = arg.indexOf('=');
    if (arg.startsWith('--') && eq > 0) {
      inline = arg.slice(eq + 1);
      arg = arg.slice(0, eq);
    }
    const value = (): string => {
      const v = inline ?? argv[++i];
      if (v === undefined) throw new UsageError(`${arg} needs a value`);
      return v;
    };
    switch (arg) {
      case '--chart': {
        const v = value();
        if (v !== 'xbar-r' && v !== 'xbar-s' && v !== 'imr') throw new UsageError(`--chart must be xbar-r, xbar-s or imr, not "${v}"`);
        opts.chart = v;
        break;
      }
      case '--rules': {
        const v = value();
        if (v !== 'we' && v !== 'extended') throw new UsageError(`--rules must be we or extended, not "${v}"`);
        opts.rules = v;
        break;
      }
      case '--lsl':
      case '--usl': {
        const raw = value();
        const v = parseNumber(raw);
        if (v === null) throw new UsageError(`${arg} must be a number, not "${raw}"`);
        opts[arg === '--lsl' ? 'lsl' : 'usl'] = v;
        break;
      }
      default:
        if (arg.startsWith('-')) throw new UsageError(`unknown option ${arg}`);
        if (file !== undefined) throw new UsageError(`only one file can be read, got "${file}" and "${arg}"`);
        file = arg;
    }
  }
  if (file === undefined) throw new UsageError('no CSV file given');
  return { ...opts, file } as Options;
}

interface Data {
  values: number[];
  sizes: number[];
  hasSubgroups: boolean;
}

function readData(file: string): Data {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw new UsageError(`cannot read ${file}: ${(e as Error).message}`);
  }
  text = text.replace(/^\uFEFF/, '');
  if (text.trim() === '') throw new UsageError(`${file} is empty`);
  // The delimiter is read from the header line. With a single column any comma in the data can only
  // be a decimal comma, so a delimiter that cannot occur keeps "12,5" in one field.
  const headerLine = text.split(/\r?\n/, 1)[0];
  const delimiter = headerLine.includes(';') ? ';' : headerLine.includes('\t') ? '\t' : headerLine.includes(',') ? ',' : ';';
  const parsed = Papa.parse<string[]>(text, { delimiter, skipEmptyLines: false });
  const rows = parsed.data;
  const header = rows[0].map((h) => h.trim().toLowerCase());
  const valueCol = header.indexOf('value');
  if (valueCol < 0) throw new UsageError(`${file}: the header row has no "value" column (it has: ${rows[0].map((h) => `"${h.trim()}"`).join(', ')})`);
  const subgroupCol = header.indexOf('subgroup');

  const order = new Map<string, number[]>();
  const values: number[] = [];
  let dataRow = 0;
  for (let r = 1; r < rows.length; r++) {
    const row = rows[r];
    if (row.every((cell) => cell.trim() === '')) continue;
    dataRow++;
    const where = `${file}, line ${r + 1} (data row ${dataRow})`;
    const cell = row[valueCol];
    if (cell === undefined || cell.trim() === '') throw new UsageError(`${where}: the value is missing`);
    const v = parseNumber(cell);
    if (v === null) throw new UsageError(`${where}: the value "${cell.trim()}" is not a number`);
    if (subgroupCol >= 0) {
      const id = (row[subgroupCol] ?? '').trim();
      if (id === '') throw new UsageError(`${where}: the subgroup is missing`);
      let group = order.get(id);
      if (!group) order.set(id, (group = []));
      group.push(v);
    } else {
      values.push(v);
    }
  }
  if (subgroupCol >= 0) {
    const sizes: number[] = [];
    for (const group of order.values()) {
      for (const v of group) values.push(v);
      sizes.push(group.length);
    }
    if (values.length === 0) throw new UsageError(`${file} has a header but no data rows`);
    return { values, sizes, hasSubgroups: true };
  }
  if (values.length === 0) throw new UsageError(`${file} has a header but no data rows`);
  return { values, sizes: values.map(() => 1), hasSubgroups: false };
}

function limitsJson(l: { center: number | null; ucl: number | null; lcl: number | null }) {
  return { center: l.center, ucl: l.ucl, lcl: l.lcl };
}

function capabilityJson(cap: CapabilityResult) {
  return {
    cp: cap.cp, cpk: cap.cpk, cpl: cap.cpl, cpu: cap.cpu, pp: cap.pp, ppk: cap.ppk, ppl: cap.ppl, ppu: cap.ppu,
    cpCi95: cap.cpCi95, cpkCi95: cap.cpkCi95, ppCi95: cap.ppCi95, ppkCi95: cap.ppkCi95,
    ppmExpected: cap.ppmExpected, ppmExpectedWithin: cap.ppmExpectedWithin, ppmObserved: cap.ppmObserved,
    normality: cap.normality === null ? null : { test: cap.normality.test, statistic: cap.normality.statistic, p: cap.normality.p },
    preliminary: cap.preliminary,
    notes: cap.notes.map((n) => n.message),
  };
}

function report(chart: ChartResult, cap: CapabilityResult | null) {
  const varying = chart.points.perPoint !== null;
  const points = new Array(chart.subgroupCount);
  for (let i = 0; i < points.length; i++) {
    const p = pointAt(chart, i);
    points[i] = varying
      ? { index: i, location: p.location, dispersion: p.dispersion, size: p.size, limits: { location: p.locationLimits, dispersion: p.dispersionLimits } }
      : { index: i, location: p.location, dispersion: p.dispersion };
  }
  return {
    chart: chart.chart,
    subgroups: chart.subgroupCount,
    n: chart.valueCount,
    location: limitsJson(chart.location),
    dispersion: limitsJson(chart.dispersion),
    sigmaWithin: chart.sigmaWithin,
    sigmaOverall: chart.sigmaOverall,
    rules: chart.rules,
    points,
    violations: chart.violations,
    capability: cap === null ? null : capabilityJson(cap),
    reasons: chart.reasons.map((r) => r.message),
  };
}

/** The JSON document the command prints. */
export type SpcReport = ReturnType<typeof report>;

function main(argv: string[]): number {
  const opts = parseArgs(argv);
  const data = readData(opts.file);
  if ((opts.chart === 'xbar-r' || opts.chart === 'xbar-s') && !data.sizes.some((s) => s >= 2)) {
    throw new UsageError(`--chart ${opts.chart} needs subgroups of two or more values; add a "subgroup" column`);
  }
  const chart = computeChart({ values: data.values, sizes: data.sizes, chart: opts.chart, rules: opts.rules });
  const cap = opts.lsl === undefined && opts.usl === undefined
    ? null
    : computeCapability({ values: data.values, sigmaWithin: chart.sigmaWithin, lsl: opts.lsl, usl: opts.usl, subgroupCount: chart.subgroupCount });
  process.stdout.write(`${JSON.stringify(report(chart, cap), null, 2)}\n`);
  return 0;
}

try {
  process.exitCode = main(process.argv.slice(2));
} catch (e) {
  if (e instanceof UsageError || e instanceof SpcInputError) {
    process.stderr.write(`spc: ${e.message}\n${e instanceof UsageError && /option|file given|needs a value|must be/.test(e.message) ? `${USAGE}\n` : ''}`);
    process.exitCode = 2;
  } else {
    throw e;
  }
}
