// The spc command line, run as a separate process the way external checks run it.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { SpcReport } from '@scripts/spc';

const root = resolve(import.meta.dirname, '../..');
const dir = mkdtempSync(join(tmpdir(), 'prismline-spc-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

let fileCount = 0;
function csv(text: string): string {
  const file = join(dir, `data-${++fileCount}.csv`);
  writeFileSync(file, text);
  return file;
}

interface Run {
  status: number | null;
  stdout: string;
  stderr: string;
  /** The printed report when the command succeeded, else null. */
  json: SpcReport;
}

function spc(args: string[], viaNpm = false): Run {
  const r = viaNpm
    ? spawnSync('npm', ['run', '--silent', 'spc', '--', ...args], { cwd: root, encoding: 'utf8' })
    : spawnSync(process.execPath, ['--import', 'tsx', 'scripts/spc.ts', ...args], { cwd: root, encoding: 'utf8' });
  const json = r.status === 0 ? (JSON.parse(r.stdout) as SpcReport) : null!;
  return { status: r.status, stdout: r.stdout, stderr: r.stderr, json };
}

// Published constants (ASTM E2587 table, from memory): d2(2) = 1.128, D4(2) = 3.267, A2(3) = 1.023, D4(3) = 2.574.
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;

describe('spc command line', () => {
  const flow = [142, 145, 141, 147, 144, 143, 146, 140, 145, 144, 142, 146];

  it('charts individuals with I–MR by default (run through npm as documented)', () => {
    const r = spc([csv(`value\n${flow.join('\n')}\n`)], true);
    expect(r.status).toBe(0);
    const out = r.json;
    const mrbar = mean(flow.slice(1).map((x, i) => Math.abs(x - flow[i])));
    expect(out.chart).toBe('imr');
    expect(out.subgroups).toBe(12);
    expect(out.n).toBe(12);
    expect(out.location.center).toBeCloseTo(mean(flow), 10);
    expect(out.location.ucl).toBeCloseTo(mean(flow) + (3 * mrbar) / 1.128, 2);
    expect(out.location.lcl).toBeCloseTo(mean(flow) - (3 * mrbar) / 1.128, 2);
    expect(out.dispersion.ucl).toBeCloseTo(3.267 * mrbar, 2);
    expect(out.dispersion.lcl).toBe(0);
    expect(out.sigmaWithin).toBeCloseTo(mrbar / 1.128, 2);
    expect(out.points[0]).toEqual({ index: 0, location: 142, dispersion: null });
    expect(out.points[1]).toEqual({ index: 1, location: 145, dispersion: 3 });
    expect(out.violations).toEqual([]);
    expect(out.capability).toBeNull();
  });

  it('reads subgroups in order of first appearance, with semicolons and decimal commas', () => {
    const rows = ['subgroup;value', 'S1;6,2', 'S2;6,8', 'S1;6,5', 'S2;6,6', 'S1;6,4', 'S2;6,9', 'S3;6,1', 'S3;6,3', 'S3;6,0'];
    const out = spc([csv(rows.join('\r\n'))]).json;
    const groups = [[6.2, 6.5, 6.4], [6.8, 6.6, 6.9], [6.1, 6.3, 6.0]];
    const rbar = mean(groups.map((g) => Math.max(...g) - Math.min(...g)));
    expect(out.chart).toBe('xbar-r');
    expect(out.subgroups).toBe(3);
    expect(out.n).toBe(9);
    groups.forEach((g, i) => expect(out.points[i].location).toBeCloseTo(mean(g), 12));
    expect(out.location.ucl).toBeCloseTo(mean(groups.flat()) + 1.023 * rbar, 3);
    expect(out.dispersion.ucl).toBeCloseTo(2.574 * rbar, 3);
  });

  it('accepts quoted decimal commas in comma-separated files and a byte order mark', () => {
    const out = spc([csv('\uFEFFvalue,subgroup\n"12,5",a\n"12,7",a\n"12,1",b\n"12,4",b\n')]).json;
    expect(out.points.map((p: { location: number }) => p.location)).toEqual([12.6, 12.25]);
  });

  it('picks X̄–S above ten values per subgroup and obeys --chart', () => {
    const lines = ['subgroup,value'];
    for (let g = 0; g < 5; g++) for (let j = 0; j < 12; j++) lines.push(`${g},${30 + ((g * 5 + j * 7) % 11) / 10}`);
    const file = csv(lines.join('\n'));
    expect(spc([file]).json.chart).toBe('xbar-s');
    expect(spc([file, '--chart', 'xbar-r']).json.chart).toBe('xbar-r');
    const imr = spc([file, '--chart=imr']).json;
    expect(imr.chart).toBe('imr');
    expect(imr.subgroups).toBe(60);
  });

  it('adds the extended rules with --rules extended', () => {
    // Scatter around 10, then seven steadily rising values (points 14–20) that stay inside the limits.
    const values = [10.2, 9.7, 10.4, 9.9, 10.1, 9.6, 10.3, 9.8, 10.0, 10.5, 9.5, 10.2, 9.9, 10.1, 9.6, 9.7, 9.8, 9.9, 10.0, 10.1, 10.2, 9.8, 10.4];
    const file = csv(`value\n${values.join('\n')}\n`);
    const we = spc([file]).json;
    expect(we.violations.filter((v: { rule: string }) => v.rule === 'trend')).toEqual([]);
    const ext = spc([file, '--rules', 'extended']).json;
    const trends = ext.violations.filter((v: { rule: string }) => v.rule === 'trend');
    expect(trends).toEqual([
      { rule: 'trend', chart: 'location', index: 19, points: [14, 15, 16, 17, 18, 19] },
      { rule: 'trend', chart: 'location', index: 20, points: [15, 16, 17, 18, 19, 20] },
    ]);
    expect(ext.rules).toContain('hugging');
  });

  it('reports rule we1 on both charts', () => {
    const values = [50, 51, 49, 50, 52, 48, 50, 51, 49, 50, 51, 50, 49, 50, 51, 58, 50, 49, 51, 50];
    const out = spc([csv(`value\n${values.join('\n')}\n`)]).json;
    expect(out.violations).toEqual(expect.arrayContaining([
      { rule: 'we1', chart: 'location', index: 15, points: [15] },
      { rule: 'we1', chart: 'dispersion', index: 15, points: [15] },
      { rule: 'we1', chart: 'dispersion', index: 16, points: [16] },
    ]));
  });

  it('computes capability against a one-sided specification', () => {
    const strength = Array.from({ length: 40 }, (_, i) => 32 + ((i * 37) % 17) / 8 - 1);
    const out = spc([csv(`value\n${strength.join('\n')}\n`), '--lsl', '28']).json;
    const cap = out.capability!;
    expect(cap.cp).toBeNull();
    expect(cap.cpu).toBeNull();
    expect(cap.cpk).toBe(cap.cpl);
    expect(cap.cpl).toBeCloseTo((mean(strength) - 28) / (3 * out.sigmaWithin!), 10);
    expect(cap.ppk).toBeCloseTo((mean(strength) - 28) / (3 * out.sigmaOverall!), 10);
    expect(cap.cpkCi95).toHaveLength(2);
    expect(cap.cpkCi95![0]).toBeLessThan(cap.cpk!);
    expect(cap.ppmObserved).toBe(0);
    expect(cap.normality!.test).toBe('anderson-darling');
    expect(cap.preliminary).toBe(true);
    const both = spc([csv(`value\n${strength.join('\n')}\n`), '--lsl=28', '--usl', '36,5']).json.capability!;
    expect(both.cp).toBeCloseTo(8.5 / (6 * out.sigmaWithin!), 10);
  });

  it('gives nulls with reasons, never NaN, for degenerate data', () => {
    const r = spc([csv('value\n7\n7\n7\n7\n'), '--lsl', '6', '--usl', '8']);
    expect(r.status).toBe(0);
    expect(r.stdout).not.toMatch(/NaN|Infinity/);
    expect(r.json.sigmaWithin).toBe(0);
    expect(r.json.capability!.cp).toBeNull();
    expect(r.json.reasons.length).toBeGreaterThan(0);
    const single = spc([csv('value\n7\n')]).json;
    expect(single.location).toEqual({ center: 7, ucl: null, lcl: null });
  });

  describe('bad input exits 2 with a message naming the problem', () => {
    const cases: Array<[string, string[], RegExp]> = [
      ['missing value column', [csv('strength,subgroup\n1,a\n')], /no "value" column/],
      ['non-numeric value', [csv('value\n12.1\n12.4\n12,x\n')], /line 4 \(data row 3\).*"12,x" is not a number/],
      ['empty value', [csv('subgroup;value\na;1\nb;\n')], /line 3 .*value is missing/],
      ['empty file', [csv('')], /is empty/],
      ['header only', [csv('value\n')], /no data rows/],
      ['missing file', [join(dir, 'nope.csv')], /cannot read/],
      ['unknown option', [csv('value\n1\n'), '--colour', 'red'], /unknown option --colour/],
      ['bad chart', [csv('value\n1\n'), '--chart', 'pareto'], /--chart must be/],
      ['bad limit', [csv('value\n1\n'), '--usl', 'high'], /--usl must be a number/],
      ['X̄–R without subgroups', [csv('value\n1\n2\n'), '--chart', 'xbar-r'], /needs subgroups/],
    ];
    for (const [name, args, message] of cases) {
      it(name, () => {
        const r = spc(args);
        expect(r.status).toBe(2);
        expect(r.stdout).toBe('');
        expect(r.stderr).toMatch(message);
      });
    }
  });
});
