import { describe, expect, it } from 'vitest';
import { computeCapability } from './capability';
import { capabilityCrossing, capabilityReading } from './capability-watch';

// Values 1..30 repeated: mean 15.5, sample standard deviation 8.80 (computed by hand from the
// variance n(n²−1)/12/(n−1) of the integers 1..30; from memory of the formula for consecutive integers).
const values = Array.from({ length: 120 }, (_, i) => (i % 30) + 1);

describe('the index a falling-capability alarm compares', () => {
  it('is Cpk when the chart is in control and Ppk when it is not', () => {
    const c = computeCapability({ values, sigmaWithin: 8, lsl: 0, usl: 60, subgroupCount: 60 });
    expect(capabilityReading(c, true)).toEqual({ index: 'Cpk', value: c.cpk });
    expect(capabilityReading(c, false)).toEqual({ index: 'Ppk', value: c.ppk });
    // Cpk = min(USL − mean, mean − LSL)/(3σ within) = 15.5/24 (ISO 22514-2 definition).
    expect(c.cpk).toBeCloseTo(15.5 / 24, 12);
  });

  it('gives no reading on a preliminary estimate (fewer than 25 subgroups or 100 values) or without a specification', () => {
    expect(capabilityReading(computeCapability({ values: values.slice(0, 40), sigmaWithin: 8, lsl: 0, usl: 60, subgroupCount: 20 }), true)).toBeNull();
    expect(capabilityReading(computeCapability({ values, sigmaWithin: 8, subgroupCount: 60 }), true)).toBeNull();
    expect(capabilityReading(null, true)).toBeNull();
  });
});

describe('once per crossing', () => {
  const at = (value: number) => ({ index: 'Cpk' as const, value });
  it('raises on the way down only, and again after the index came back', () => {
    expect(capabilityCrossing(false, at(1.2), 1.33)).toEqual({ below: true, raise: true });
    expect(capabilityCrossing(true, at(1.1), 1.33)).toEqual({ below: true, raise: false });
    expect(capabilityCrossing(true, at(1.4), 1.33)).toEqual({ below: false, raise: false });
    expect(capabilityCrossing(false, at(1.0), 1.33)).toEqual({ below: true, raise: true });
    expect(capabilityCrossing(null, at(1.0), 1.33)).toEqual({ below: true, raise: true });
  });
  it('counts an index exactly on the threshold as not below', () => {
    expect(capabilityCrossing(false, at(1.33), 1.33)).toEqual({ below: false, raise: false });
  });
});
