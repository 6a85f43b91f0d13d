import type { ImportOutcome } from './import';

/** What happens after results are stored or withdrawn (alarms, incremental SPC runs); never blocks the response with failures. */
export interface IngestHooks {
  afterImport(outcome: Extract<ImportOutcome, { kind: 'imported' }>): Promise<void>;
  afterVoid(info: { uploadId: number; characteristicIds: number[] }): Promise<void>;
}

export const noIngestHooks: IngestHooks = {
  afterImport: async () => undefined,
  afterVoid: async () => undefined,
};
