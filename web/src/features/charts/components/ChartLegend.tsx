import { lineStyles, markers, type LineKind, type MarkerKind } from '../lib/line-styles';

const lineOrder: LineKind[] = ['centre', 'control', 'zone', 'spec', 'target', 'event'];
const markerOrder: MarkerKind[] = ['signal', 'outOfSpec', 'excluded', 'selected'];

/** What each line and marker of the chart means, drawn with the chart's own dash patterns and shapes. */
export function ChartLegend({ hasSpec, hasTarget }: { hasSpec: boolean; hasTarget: boolean }) {
  const lines = lineOrder.filter((k) => (k !== 'spec' || hasSpec) && (k !== 'target' || hasTarget));
  return (
    <ul aria-label="Chart key" className="flex flex-wrap gap-x-5 gap-y-1.5 text-sm text-zinc-700">
      {lines.map((kind) => {
        const s = lineStyles[kind];
        return (
          <li key={kind} className="flex items-center gap-2">
            <svg width="36" height="10" aria-hidden="true">
              <line x1="0" y1="5" x2="36" y2="5" stroke={s.color} strokeWidth={s.width + 0.5} strokeDasharray={s.dash.join(' ') || undefined} />
            </svg>
            {s.label}
          </li>
        );
      })}
      <li className="flex items-center gap-2">
        <svg width="24" height="12" aria-hidden="true">
          <rect x="0" y="0" width="12" height="12" fill="rgba(159, 18, 57, 0.14)" />
          <rect x="12" y="0" width="12" height="12" fill="rgba(180, 83, 9, 0.12)" />
        </svg>
        Zones A (2σ–3σ) and B (1σ–2σ)
      </li>
      {markerOrder.map((kind) => {
        const m = markers[kind];
        return (
          <li key={kind} className="flex items-center gap-2">
            <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true" fill={m.color} stroke={m.color} dangerouslySetInnerHTML={{ __html: m.svg }} />
            {m.label}
          </li>
        );
      })}
    </ul>
  );
}
