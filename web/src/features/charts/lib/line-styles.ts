// How each reference line is drawn. Every kind differs by dash pattern and carries a text label, so
// the chart reads the same in greyscale print and for colour-blind readers; colour only supports it.

export interface LineStyleSpec {
  label: string;
  color: string;
  width: number;
  /** Dash pattern in pixels (on, off, …); empty for a solid line. */
  dash: number[];
}

export const lineStyles = {
  centre: { label: 'Centre line', color: '#27272a', width: 1.5, dash: [] },
  control: { label: 'Control limits (UCL, LCL)', color: '#9f1239', width: 1.5, dash: [7, 4] },
  zone: { label: '1σ and 2σ zone lines', color: '#71717a', width: 1, dash: [1, 3] },
  spec: { label: 'Specification limits (LSL, USL)', color: '#1e3a8a', width: 2.25, dash: [12, 3, 2, 3] },
  target: { label: 'Target', color: '#166534', width: 1.5, dash: [16, 5] },
  event: { label: 'Process event', color: '#52525b', width: 1, dash: [3, 3] },
} satisfies Record<string, LineStyleSpec>;

export type LineKind = keyof typeof lineStyles;

export interface MarkerSpec {
  label: string;
  /** echarts symbol name. */
  symbol: string;
  size: number;
  color: string;
  /** The same shape as inline SVG, for the legend. */
  svg: string;
}

export const markers = {
  point: { label: 'Plotted point', symbol: 'circle', size: 5, color: '#3f3f46', svg: '<circle cx="8" cy="8" r="3" />' },
  signal: { label: 'Breaks a run rule', symbol: 'triangle', size: 12, color: '#b91c1c', svg: '<path d="M8 2 L14 14 L2 14 Z" />' },
  outOfSpec: { label: 'Outside specification', symbol: 'diamond', size: 12, color: '#1e3a8a', svg: '<path d="M8 1 L15 8 L8 15 L1 8 Z" />' },
  excluded: { label: 'Excluded from the limits', symbol: 'emptyRect', size: 12, color: '#52525b', svg: '<rect x="3" y="3" width="10" height="10" fill="none" stroke-width="2" />' },
  selected: { label: 'Selected point', symbol: 'emptyCircle', size: 22, color: '#1f5f6b', svg: '<circle cx="8" cy="8" r="6" fill="none" stroke-width="2.5" />' },
} satisfies Record<string, MarkerSpec>;

export type MarkerKind = keyof typeof markers;

/** Zone shading: zone A (2σ to 3σ) a little stronger than zone B (1σ to 2σ); zone C is left clear. */
export const zoneFill = { A: 'rgba(159, 18, 57, 0.07)', B: 'rgba(180, 83, 9, 0.06)' } as const;
