import type { OverviewItem } from '@shared/schemas/overview';

const W = 240;
const H = 44;
const PAD = 5;

/** The period's points as a small line: triangles where a run rule is broken, diamonds outside the specification (both where both). */
export function TrendLine({ item }: { item: OverviewItem }) {
  const pts = item.trend;
  if (pts.length < 2) return <div className="h-11 text-sm text-zinc-500">Too few points in the period for a trend.</div>;
  let lo = Infinity;
  let hi = -Infinity;
  for (const p of pts) {
    lo = Math.min(lo, p.location);
    hi = Math.max(hi, p.location);
  }
  const span = hi - lo || 1;
  const x = (i: number) => PAD + ((W - 2 * PAD) * i) / (pts.length - 1);
  const y = (v: number) => H - PAD - ((H - 2 * PAD) * (v - lo)) / span;
  const line = pts.map((p, i) => `${x(i).toFixed(1)},${y(p.location).toFixed(1)}`).join(' ');
  const signals = item.signals;
  const outside = item.outOfSpecCount;
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      preserveAspectRatio="none"
      className="h-11 w-full"
      role="img"
      aria-label={`Trend of the period's ${item.pointsInPeriod} lots${signals ? `, ${signals} with a run-rule signal` : ''}${outside ? `, ${outside} outside the specification` : ''}`}
      data-signal-marks={pts.filter((p) => p.signal).length}
    >
      <polyline points={line} fill="none" stroke="#52525b" strokeWidth="1.5" vectorEffect="non-scaling-stroke" />
      {pts.map((p, i) => (p.outOfSpec ? <path key={`o${i}`} d={`M${x(i)} ${y(p.location) - 5} l5 5 l-5 5 l-5 -5 z`} fill="#1e3a8a" /> : null))}
      {/* Signals above the diamonds: a lot that is both keeps its triangle in view. */}
      {pts.map((p, i) => (p.signal ? <path key={`s${i}`} data-mark="signal" d={`M${x(i)} ${y(p.location) - 5} l4.5 8 h-9 z`} fill="#b91c1c" /> : null))}
    </svg>
  );
}
