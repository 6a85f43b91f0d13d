// The SPC run as the API answers it and the runs page reads it. Kept free of zod.

/** Why a run was started; 'settings': a characteristic's chart type, subgroup size or run-rule set changed. */
export type RunTrigger = 'schedule' | 'manual' | 'upload' | 'void' | 'correction' | 'limits' | 'settings' | 'first';
export type RunStatus = 'queued' | 'running' | 'succeeded' | 'failed';

/** GET /api/v1/spc-runs and /api/v1/spc-runs/:id */
export interface RunSummary {
  id: number;
  kind: 'full' | 'incremental';
  trigger: RunTrigger;
  status: RunStatus;
  characteristics: number;
  done: number;
  failed: number;
  running: number;
  alarmsRaised: number;
  alarmsResolved: number;
  requestedBy: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

/** A characteristic whose computation in a run failed, or failed once and waits for a retry. */
export interface RunProblem {
  characteristicId: number;
  characteristicCode: string;
  attempts: number;
  error: string | null;
}

/** GET /api/v1/spc-runs/:id */
export interface RunDetail extends RunSummary {
  failures: RunProblem[];
  /** Characteristics that failed an attempt and wait for a retry. */
  retrying: RunProblem[];
}
