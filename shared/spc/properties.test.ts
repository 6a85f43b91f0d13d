// Invariances that any correct chart and capability computation must have (fast-check).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { computeCapability } from './capability';
import { computeChart, type ChartType } from './charts';

const close = (a: number | null, b: number | null, scale: number) => {
  expect(a === null).toBe(b === null);
  if (a !== null && b !== null) expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(scale)));
};

// Subgroups of 1 to 8 values of realistic lab readings (two decimals).
const reading = fc.integer({ min: 2000, max: 4000 }).map((v) => v / 100);
const subgrouped = (size: number) => fc.array(fc.array(reading, { minLength: size, maxLength: size }), { minLength: 3, maxLength: 30 });
const chartCase = fc.oneof(
  fc.record({ chart: fc.constant<ChartType>('imr'), groups: subgrouped(1) }),
  fc.record({ chart: fc.constant<ChartType>('xbar-r'), groups: fc.integer({ min: 2, max: 8 }).chain(subgrouped) }),
  fc.record({ chart: fc.constant<ChartType>('xbar-s'), groups: fc.integer({ min: 2, max: 8 }).chain(subgrouped) }),
);

function summary(groups: number[][], chart: ChartType, lsl: number, usl: number) {
  const c = computeChart({ subgroups: groups, chart });
  const cap = computeCapability({ values: groups.flat(), sigmaWithin: c.sigmaWithin, lsl, usl, subgroupCount: c.subgroupCount });
  return { c, cap };
}

describe('properties', () => {
  it('adding a constant moves every limit by that constant and leaves the indices unchanged', () => {
    fc.assert(
      fc.property(chartCase, fc.double({ min: -1000, max: 1000, noNaN: true }), ({ chart, groups }, k) => {
        const a = summary(groups, chart, 25, 35);
        const b = summary(groups.map((g) => g.map((v) => v + k)), chart, 25 + k, 35 + k);
        const scale = 1000;
        for (const key of ['center', 'ucl', 'lcl'] as const) {
          close(b.c.location[key], a.c.location[key] === null ? null : (a.c.location[key] as number) + k, scale);
          close(b.c.dispersion[key], a.c.dispersion[key], scale);
        }
        close(b.c.sigmaWithin, a.c.sigmaWithin, scale);
        close(b.c.sigmaOverall, a.c.sigmaOverall, scale);
        for (const key of ['cp', 'cpk', 'cpl', 'cpu', 'pp', 'ppk'] as const) close(b.cap[key], a.cap[key], 1e3);
      }),
      { numRuns: 200 },
    );
  });
  it('scaling the values scales the limits and sigmas and leaves the indices unchanged', () => {
    fc.assert(
      fc.property(chartCase, fc.double({ min: 0.01, max: 100, noNaN: true }), ({ chart, groups }, f) => {
        const a = summary(groups, chart, 25, 35);
        const b = summary(groups.map((g) => g.map((v) => v * f)), chart, 25 * f, 35 * f);
        const scale = 40 * f;
        for (const key of ['center', 'ucl', 'lcl'] as const) {
          close(b.c.location[key], a.c.location[key] === null ? null : (a.c.location[key] as number) * f, scale);
          close(b.c.dispersion[key], a.c.dispersion[key] === null ? null : (a.c.dispersion[key] as number) * f, scale);
        }
        close(b.c.sigmaWithin, a.c.sigmaWithin === null ? null : a.c.sigmaWithin * f, scale);
        for (const key of ['cp', 'cpk', 'pp', 'ppk'] as const) close(b.cap[key], a.cap[key], 1e3);
      }),
      { numRuns: 200 },
    );
  });
  it('permuting the values within a subgroup changes nothing', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 8 }).chain(subgrouped),
        fc.constantFrom<ChartType>('xbar-r', 'xbar-s'),
        fc.integer(),
        (groups, chart, seed) => {
          const shuffled = groups.map((g, i) => {
            const s = [...g];
            let r = (seed ^ (i * 2654435761)) >>> 0;
            for (let j = s.length - 1; j > 0; j--) {
              r = (Math.imul(r, 1664525) + 1013904223) >>> 0;
              const k = r % (j + 1);
              [s[j], s[k]] = [s[k], s[j]];
            }
            return s;
          });
          const a = summary(groups, chart, 25, 35);
          const b = summary(shuffled, chart, 25, 35);
          for (const key of ['center', 'ucl', 'lcl'] as const) {
            close(b.c.location[key], a.c.location[key], 40);
            close(b.c.dispersion[key], a.c.dispersion[key], 40);
          }
          for (let i = 0; i < groups.length; i++) {
            close(b.c.points.location[i], a.c.points.location[i], 40);
            close(b.c.points.dispersion[i], a.c.points.dispersion[i], 40);
          }
          close(b.cap.cpk, a.cap.cpk, 1e3);
          close(b.cap.ppk, a.cap.ppk, 1e3);
        },
      ),
      { numRuns: 200 },
    );
  });
});
