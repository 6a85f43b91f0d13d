// Query keys that more than one feature uses: a change in one area (a correction, a new specification
// revision, a catalogue edit) refreshes the charts and the overview another area shows.

export interface OverviewFilters {
  line?: string;
  family?: string;
  days: number;
}

/** Every change to a chart invalidates `chartKeys.characteristic(id)`. */
export const chartKeys = {
  all: ['charts'] as const,
  characteristic: (id: number) => [...chartKeys.all, id] as const,
  revisions: (id: number) => [...chartKeys.characteristic(id), 'limit-revisions'] as const,
};

/** Chart changes (exclusions, freezes) invalidate `overviewKeys.all`. */
export const overviewKeys = {
  all: ['overview'] as const,
  view: (filters: OverviewFilters) => [...overviewKeys.all, filters] as const,
};
