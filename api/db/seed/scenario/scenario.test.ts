import { createHash } from 'node:crypto';
import Papa from 'papaparse';
import { linearRegression, mean } from 'simple-statistics';
import { beforeAll, describe, expect, it } from 'vitest';
import { TZDate } from '@date-fns/tz';
import { classValue, isPhysicallyPossible, parseScreedDesignation, testMethod } from '@shared/lab';
import {
  type DemoResultRow,
  type PlantedCause,
  canonicalCsvHeader,
  characteristics,
  generateDemoResults,
  lines,
  nextWorkingMorning,
  plantOffsetMinutes,
  plantIso,
  plantedCausesFor,
  processEventsFor,
  products,
  specificationIssuedAt,
  toCanonicalCsv,
} from '.';

const endDate = new Date('2026-12-01T06:00:00Z');
const endMs = endDate.getTime();
let rows: DemoResultRow[];
let causes: PlantedCause[];

beforeAll(() => {
  rows = generateDemoResults({ endDate });
  causes = plantedCausesFor({ endDate });
});

// Control chart constants from the ASTM E2587 table (also NIST/SEMATECH e-Handbook §6.3.2):
// d2 for subgroups of 2, 3 and 6, and c4 for 10.
const d2: Record<number, number> = { 2: 1.128, 3: 1.693, 6: 2.534 };
const c4For10 = 0.9727;

interface Subgroup {
  lot: string;
  producedMs: number;
  testedMs: number;
  values: number[];
}

function subgroups(code: string, from: readonly DemoResultRow[] = rows): Subgroup[] {
  const byLot = new Map<string, Subgroup>();
  for (const r of from) {
    if (r.characteristic !== code) continue;
    const g = byLot.get(r.lot) ?? { lot: r.lot, producedMs: Date.parse(r.produced_at), testedMs: Date.parse(r.tested_at), values: [] };
    g.values.push(r.value);
    byLot.set(r.lot, g);
  }
  return [...byLot.values()].sort((a, b) => a.producedMs - b.producedMs);
}

const range = (v: number[]) => Math.max(...v) - Math.min(...v);
const sampleSd = (v: number[]) => {
  const m = mean(v);
  return Math.sqrt(v.reduce((s, x) => s + (x - m) ** 2, 0) / (v.length - 1));
};

/** Within-subgroup σ: MR̄/d2(2) for single readings, R̄/d2 for small subgroups, s̄/c4 for ten. */
function sigmaWithin(groups: Subgroup[]): number {
  const n = groups[0].values.length;
  if (n === 1) {
    const mr = groups.slice(1).map((g, i) => Math.abs(g.values[0] - groups[i].values[0]));
    return mean(mr) / d2[2];
  }
  if (n === 10) return mean(groups.map((g) => sampleSd(g.values))) / c4For10;
  return mean(groups.map((g) => range(g.values))) / d2[n];
}

function inCause(c: PlantedCause, g: Subgroup): boolean {
  if (c.lot) return c.lot === g.lot;
  const t = c.basis === 'produced' ? g.producedMs : g.testedMs;
  return t >= Date.parse(c.start) && (c.end === null || t < Date.parse(c.end));
}

const cause = (id: string) => {
  const c = causes.find((x) => x.id === id);
  if (!c) throw new Error(`planted cause ${id} missing`);
  return c;
};

describe('generateDemoResults', () => {
  it('is deterministic: the same options give identical rows, another seed other values', () => {
    expect(generateDemoResults({ endDate })).toEqual(rows);
    const other = generateDemoResults({ endDate, seed: 7 });
    expect(other.length).toBe(rows.length);
    expect(other.map((r) => r.value)).not.toEqual(rows.map((r) => r.value));
  });

  it('produces about 2000 lots and 30–60 thousand rows over six months', () => {
    const lots = new Set(rows.map((r) => r.lot));
    expect(lots.size).toBeGreaterThan(1800);
    expect(lots.size).toBeLessThan(2200);
    expect(rows.length).toBeGreaterThan(30_000);
    expect(rows.length).toBeLessThan(60_000);
  });

  it('uses only codes that exist, with each characteristic on its own product and line', () => {
    const productLine = new Map(products.map((p) => [p.code, p.lineCode]));
    const charProduct = new Map(characteristics.map((c) => [c.code, c.productCode]));
    const lineCodes = new Set(lines.map((l) => l.code));
    const wrong = rows.filter(
      (r) =>
        charProduct.get(r.characteristic) !== r.product ||
        productLine.get(r.product) !== r.line ||
        !lineCodes.has(r.line) ||
        !['early', 'late', 'night'].includes(r.shift),
    );
    expect(wrong).toEqual([]);
  });

  it('keeps every value inside the physical range of its test method', () => {
    const method = new Map(characteristics.map((c) => [c.code, c.testMethodCode]));
    const impossible = rows.filter((r) => !isPhysicallyPossible(method.get(r.characteristic)!, r.value));
    expect(impossible).toEqual([]);
  });

  it('generates no result tested after the end date, and none before production', () => {
    const late = rows.filter((r) => Date.parse(r.tested_at) > endMs);
    const early = rows.filter((r) => Date.parse(r.tested_at) <= Date.parse(r.produced_at));
    expect(late).toEqual([]);
    expect(early).toEqual([]);
  });

  it('tests fresh mortar within hours and hardened specimens at their age', () => {
    const age = new Map(characteristics.map((c) => [c.code, c.ageDays]));
    const offAge = rows.filter((r) => {
      const days = (Date.parse(r.tested_at) - Date.parse(r.produced_at)) / 86_400_000;
      const a = age.get(r.characteristic);
      return a === null ? days >= 5 / 24 : Math.abs(days - a!) >= 0.1;
    });
    expect(offAge).toEqual([]);
  });

  it('leaves out 28-day results of lots made in the last four weeks', () => {
    const lastRc28 = Math.max(...rows.filter((r) => r.characteristic === 'HVL25-RC28').map((r) => Date.parse(r.produced_at)));
    expect(endMs - lastRc28).toBeGreaterThanOrEqual(28 * 86_400_000);
    const lastFlow = Math.max(...rows.filter((r) => r.characteristic === 'HVL25-FLOW').map((r) => Date.parse(r.produced_at)));
    expect(endMs - lastFlow).toBeLessThan(3 * 86_400_000);
  });

  it('gives each lot number to one lot only', () => {
    const identity = new Map<string, Set<string>>();
    for (const r of rows) {
      const who = `${r.product}|${r.line}|${r.produced_at}|${r.shift}`;
      identity.set(r.lot, (identity.get(r.lot) ?? new Set()).add(who));
    }
    expect([...identity].filter(([, w]) => w.size > 1)).toEqual([]);
    const producedAt = [...identity.values()].map((w) => [...w][0].split('|').slice(1, 3).join('|'));
    expect(new Set(producedAt).size).toBe(identity.size);
  });

  it('numbers replicates 1..n completely for every lot and characteristic', () => {
    const n = new Map(characteristics.map((c) => [c.code, c.replicates]));
    const seen = new Map<string, number[]>();
    for (const r of rows) {
      const key = `${r.lot}|${r.characteristic}`;
      seen.set(key, [...(seen.get(key) ?? []), r.replicate]);
    }
    const incomplete = [...seen].filter(([key, reps]) => {
      const expected = Array.from({ length: n.get(key.split('|')[1])! }, (_, i) => i + 1);
      return reps.join() !== expected.join();
    });
    expect(seen.size).toBeGreaterThan(10_000);
    expect(incomplete).toEqual([]);
  });

  it('writes times in ISO 8601 with the Europe/London offset of the moment', () => {
    // External reference: the IANA time zone database as shipped in Node's ICU (Intl).
    const offsetName = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', timeZoneName: 'longOffset' });
    const intlOffset = (ms: number) => {
      const name = offsetName.formatToParts(ms).find((p) => p.type === 'timeZoneName')!.value;
      return name === 'GMT' ? 0 : Number(name.slice(4, 6)) * 60;
    };
    const disagree: number[] = [];
    for (let ms = Date.UTC(2025, 0, 1); ms < Date.UTC(2028, 0, 1); ms += 3_600_000) {
      if (plantOffsetMinutes(ms) !== intlOffset(ms)) disagree.push(ms);
    }
    expect(disagree).toEqual([]);
    const iso = /^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\+0[01]:00$/;
    const badTimes = rows.filter((r) => !iso.test(r.produced_at) || !iso.test(r.tested_at) || plantIso(Date.parse(r.produced_at)) !== r.produced_at);
    expect(badTimes).toEqual([]);
    expect(rows.some((r) => r.produced_at.endsWith('+01:00')) && rows.some((r) => r.produced_at.endsWith('+00:00'))).toBe(true);
  });
});

describe('planted special causes', () => {
  it('has a step change in flow after the new sand source larger than 2 σ within', () => {
    const step = cause('sand-source');
    const event = processEventsFor({ endDate }).find((e) => e.title === 'New sand source');
    expect(event?.at).toBe(step.start);
    for (const code of ['HVL25-FLOW', 'HVL25-FLOW30']) {
      const groups = subgroups(code);
      const before = groups.filter((g) => !inCause(step, g));
      const after = groups.filter((g) => inCause(step, g));
      // σ within from the ranges of the two readings, R̄ / d2 with d2(2) = 1.128 (ASTM E2587).
      const sigma = sigmaWithin(before);
      const shift = mean(before.flatMap((g) => g.values)) - mean(after.flatMap((g) => g.values));
      expect(after.length).toBeGreaterThan(100);
      expect(shift).toBeGreaterThan(2 * sigma);
      expect(shift).toBeLessThan(3 * sigma);
    }
  });

  it('has a rising air content over the defoamer drift window, ended by the new batch', () => {
    const drift = cause('defoamer-drift');
    const event = processEventsFor({ endDate }).find((e) => e.title === 'New defoamer batch');
    expect(event?.at).toBe(drift.end);
    const groups = subgroups('HVL25-AIR');
    const inside = groups.filter((g) => inCause(drift, g));
    const days = (g: Subgroup) => g.producedMs / 86_400_000;
    const { m } = linearRegression(inside.map((g) => [days(g), g.values[0]]));
    expect(m).toBeGreaterThan(0.03); // % per day: about 1.7 % over 28 days
    const endOfDrift = Date.parse(drift.end!);
    const lastWeek = inside.filter((g) => g.producedMs >= endOfDrift - 7 * 86_400_000);
    const nextWeeks = groups.filter((g) => g.producedMs >= endOfDrift && g.producedMs < endOfDrift + 14 * 86_400_000);
    expect(mean(lastWeek.map((g) => g.values[0])) - mean(nextWeeks.map((g) => g.values[0]))).toBeGreaterThan(1);
  });

  it('has a week of low 1-day compressive strength after the cold snap, 28-day strength unaffected', () => {
    const cold = cause('cold-snap');
    for (const code of ['HVL25-RC1', 'HVLF-RC1']) {
      const groups = subgroups(code);
      const inside = groups.filter((g) => inCause(cold, g)).flatMap((g) => g.values);
      const outside = groups.filter((g) => !inCause(cold, g)).flatMap((g) => g.values);
      expect(inside.length).toBeGreaterThan(0);
      expect(mean(inside)).toBeLessThan(0.85 * mean(outside));
    }
    const rc28 = subgroups('HVL25-RC28');
    const inside28 = rc28.filter((g) => inCause(cold, g)).flatMap((g) => g.values);
    expect(Math.abs(mean(inside28) / mean(rc28.flatMap((g) => g.values)) - 1)).toBeLessThan(0.05);
  });

  it('has compressive sets reading high on the morning of the miscalibrated press, then the recalibration', () => {
    const press = cause('press-miscalibration');
    expect(press.characteristicCodes.length).toBeGreaterThan(0);
    expect(processEventsFor({ endDate }).find((e) => e.title === 'Press recalibrated')?.at).toBe(press.end);
    for (const code of press.characteristicCodes) {
      const groups = subgroups(code);
      const hit = groups.filter((g) => inCause(press, g));
      const others = groups.filter((g) => !inCause(press, g)).map((g) => mean(g.values));
      expect(hit.length).toBe(1);
      expect(mean(hit[0].values)).toBeGreaterThan(1.1 * mean(others));
    }
  });

  it('has 3 to 6 single out-of-spec lots, each outside its specification', () => {
    const spec = new Map(characteristics.map((c) => [c.code, c.spec]));
    const oos = causes.filter((c) => c.kind === 'out-of-spec-lot');
    expect(oos.length).toBeGreaterThanOrEqual(3);
    expect(oos.length).toBeLessThanOrEqual(6);
    for (const c of oos) {
      const code = c.characteristicCodes[0];
      const values = rows.filter((r) => r.lot === c.lot && r.characteristic === code).map((r) => r.value);
      const { lsl = -Infinity, usl = Infinity } = spec.get(code)!;
      const m = mean(values);
      expect(m < lsl || m > usl).toBe(true);
    }
  });

  it('keeps the planted out-of-spec lots outside their specification whatever day the history ends', () => {
    // The noise of each lot moves with the end date; a plant that lands near its limit fails on some days.
    const spec = new Map(characteristics.map((c) => [c.code, c.spec]));
    const inside: string[] = [];
    for (let day = 0; day < 21; day++) {
      const end = new Date(Date.UTC(2026, 10, 20 + day, 6));
      const generated = generateDemoResults({ endDate: end });
      for (const c of plantedCausesFor({ endDate: end }).filter((x) => x.kind === 'out-of-spec-lot')) {
        const code = c.characteristicCodes[0];
        const m = mean(generated.filter((r) => r.lot === c.lot && r.characteristic === code).map((r) => r.value));
        const { lsl = -Infinity, usl = Infinity } = spec.get(code)!;
        if (!(m < lsl || m > usl)) inside.push(`${end.toISOString().slice(0, 10)} ${c.id} ${m}`);
      }
    }
    expect(inside).toEqual([]);
  }, 30_000);

  it('leaves the processes capable outside the planted causes, with one marginal characteristic', () => {
    // Cpk = min(USL − x̄, x̄ − LSL) / 3σ within (ISO 22514-2), σ within from the ASTM E2587 constants.
    const cpk = new Map<string, number>();
    for (const c of characteristics) {
      const affecting = causes.filter((k) => k.characteristicCodes.includes(c.code));
      const groups = subgroups(c.code).filter((g) => !affecting.some((k) => inCause(k, g)));
      const xbar = mean(groups.flatMap((g) => g.values));
      const sigma = sigmaWithin(groups);
      const { lsl, usl } = c.spec;
      cpk.set(c.code, Math.min(lsl === undefined ? Infinity : (xbar - lsl) / (3 * sigma), usl === undefined ? Infinity : (usl - xbar) / (3 * sigma)));
    }
    const marginal = [...cpk].filter(([, v]) => v < 1.2);
    expect(marginal.map(([k]) => k)).toEqual(['HVFX-DEFORM28']);
    expect(cpk.get('HVFX-DEFORM28')).toBeGreaterThan(0.8);
    for (const [code, v] of cpk) if (code !== 'HVFX-DEFORM28') expect(v, code).toBeLessThan(2.2);
  });

  it('drops causes and events that fall before a shorter window', () => {
    const oneMonth = { endDate, months: 1 };
    const ids = plantedCausesFor(oneMonth).map((c) => c.id);
    expect(ids).toContain('press-miscalibration');
    expect(ids).not.toContain('cold-snap');
    expect(processEventsFor(oneMonth).map((e) => e.title)).toEqual(['Press recalibrated']);
    const start = Date.parse(generateDemoResults(oneMonth)[0].produced_at);
    expect(endMs - start).toBeLessThanOrEqual(31 * 86_400_000);
  });
});

describe('characteristics', () => {
  it('have unique codes built from the product, the test method and the age', () => {
    const codes = characteristics.map((c) => c.code);
    expect(new Set(codes).size).toBe(codes.length);
    for (const c of characteristics) {
      expect(c.code.startsWith(`${c.productCode}-`)).toBe(true);
      if (c.ageDays !== null) expect(c.code).toBe(`${c.productCode}-${c.testMethodCode}${c.ageDays}`);
      expect(c.unit).toBe(testMethod(c.testMethodCode).unit);
    }
  });

  it('take the 28-day lower limits of the levelling compounds from their EN 13813 designation', () => {
    for (const p of products.filter((x) => x.family === 'levelling')) {
      const d = parseScreedDesignation(p.declaredClass);
      if (!d.ok) throw new Error(d.error);
      const spec = (code: string) => characteristics.find((c) => c.code === code)!.spec;
      expect(spec(`${p.code}-RC28`).lsl).toBe(classValue(d.value.compressive!));
      expect(spec(`${p.code}-RF28`).lsl).toBe(classValue(d.value.flexural!));
    }
  });

  it('choose I–MR for single readings, X̄–R for small subgroups and X̄–S for ten', () => {
    for (const c of characteristics) {
      const expected = c.replicates === 1 ? 'imr' : c.replicates >= 10 ? 'xbar-s' : 'xbar-r';
      expect(c.chartType, c.code).toBe(expected);
    }
  });
});

describe('toCanonicalCsv', () => {
  it('writes the canonical header and rows that a CSV parser reads back unchanged', () => {
    const sample = rows.filter((r, i) => i < 500 || r.note);
    const csv = toCanonicalCsv(sample);
    expect(csv.split('\r\n')[0]).toBe('lot,product,line,produced_at,characteristic,value,shift,replicate,tested_at,operator,note');
    // Reference parser: papaparse (RFC 4180 quoting).
    const parsed = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual([...canonicalCsvHeader]);
    expect(parsed.data.length).toBe(sample.length);
    parsed.data.forEach((p, i) => {
      const r = sample[i];
      expect(Number(p.value)).toBe(r.value);
      expect(Number(p.replicate)).toBe(r.replicate);
      expect(p.note).toBe(r.note ?? '');
      expect(p.tested_at).toBe(r.tested_at);
    });
    expect(sample.some((r) => r.note?.includes(','))).toBe(true);
  });

  it('quotes commas, quotes and line breaks and uses dot decimals', () => {
    const row: DemoResultRow = {
      lot: 'L1-261104-E1',
      product: 'HVL25',
      line: 'L1',
      produced_at: '2026-11-04T07:12:00+00:00',
      characteristic: 'HVL25-AIR',
      value: 3.4,
      shift: 'early',
      replicate: 1,
      tested_at: '2026-11-04T07:55:00+00:00',
      operator: 'AT',
      note: 'Bag marked "retain", see\nlog',
    };
    const line = toCanonicalCsv([row]).split('\r\n').slice(1).join('\r\n');
    expect(line).toBe('L1-261104-E1,HVL25,L1,2026-11-04T07:12:00+00:00,HVL25-AIR,3.4,early,1,2026-11-04T07:55:00+00:00,AT,"Bag marked ""retain"", see\nlog"\r\n');
  });
});

describe("the dates of the quality manager's decisions", () => {
  // UK clocks went back on Sunday 25 October 2026 at 01:00 UTC (the last Sunday of October, UK
  // summer-time rule); @date-fns/tz (IANA zone database) reads the plant's wall clock.
  const wall = (ms: number) => {
    const d = new TZDate(ms, 'Europe/London');
    return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')} ${String(d.getHours()).padStart(2, '0')}:${String(d.getMinutes()).padStart(2, '0')} day ${d.getDay()}`;
  };

  it('falls on the next working morning, 10:00 on the plant clock, across weekends and a clock change', () => {
    // Tuesday 23:30 BST (22:30 UTC) → Wednesday 10:00 BST.
    expect(wall(nextWorkingMorning(Date.parse('2026-10-20T22:30:00Z')))).toBe('2026-10-21 10:00 day 3');
    // Friday 15:00 BST → Monday 10:00 GMT, after the clock change: 10:00 UTC.
    expect(nextWorkingMorning(Date.parse('2026-10-23T14:00:00Z'))).toBe(Date.parse('2026-10-26T10:00:00Z'));
    // Saturday and Sunday → Monday.
    expect(wall(nextWorkingMorning(Date.parse('2026-11-07T09:00:00Z')))).toBe('2026-11-09 10:00 day 1');
    expect(wall(nextWorkingMorning(Date.parse('2026-11-08T23:59:00Z')))).toBe('2026-11-09 10:00 day 1');
    // 00:30 BST on Thursday is still Wednesday in UTC: the plant's day counts → Friday.
    expect(wall(nextWorkingMorning(Date.parse('2026-07-15T23:30:00Z')))).toBe('2026-07-17 10:00 day 5');
  });

  it('issues the specifications at 09:00 plant time, before the six months of history', () => {
    const issued = specificationIssuedAt(endMs);
    expect(wall(issued)).toMatch(/ 09:00 /);
    expect(issued).toBeLessThan(Math.min(...rows.map((r) => Date.parse(r.produced_at))));
  });
});

describe('the demo history stays the same', () => {
  // SHA-256 (FIPS 180-4, through node:crypto) of what the scenario gave before it was split into plant,
  // calendar, causes and generator files: the same end date must give the same history byte for byte,
  // so a demo reseeded after a refactor shows the same charts. Change these only with the data.
  const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

  it('gives the same CSV, causes and process log for an end date', () => {
    expect(sha256(toCanonicalCsv(rows))).toBe('ddfefac4baf78b8f7589132c5d5309f41c7ca48383f612c80a5b1e2c3a0ec1ce');
    expect(sha256(JSON.stringify(causes))).toBe('d15da01919119f40d93c514bdbcec1a910d2f07da8d6f8d4a33cde859aaeeeda');
    // The log as it was pinned, and who wrote each event (added so that the seeded log names them).
    const log = processEventsFor({ endDate });
    expect(sha256(JSON.stringify(log.map(({ recordedBy: _, ...e }) => e)))).toBe('f18cd6e079c3cdd3e1909534f3def5144c1625ef3b2edd805589dfcfd76139ac');
    expect(log.map((e) => [e.title, e.recordedBy])).toEqual([
      ['Lab balances checked', 'technician'],
      ['Mixer blades replaced', 'quality_manager'],
      ['Cold weather', 'technician'],
      ['Cement from second silo', 'quality_manager'],
      ['New defoamer batch', 'technician'],
      ['New sand source', 'quality_manager'],
      ['Press recalibrated', 'technician'],
    ]);
  });

  it('gives the same CSV for another window and seed, across a spring clock change', () => {
    const spring = new Date('2026-04-02T06:00:00Z');
    expect(sha256(toCanonicalCsv(generateDemoResults({ endDate: spring, months: 3, seed: 7 })))).toBe('302d23766875406a26b23c597343414b7792213941c54f76b216e0d946b85e7c');
  });
});
