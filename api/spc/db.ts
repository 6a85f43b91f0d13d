import type { Database } from '../db/client';

export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0];
/** The pool or an open transaction: the chart is read the same way inside a run's transaction. */
export type Executor = Database | Tx;

export { arr } from '../db/sql';

/** Serialises changes to one characteristic's limits and exclusions (and its run job): pg_advisory_xact_lock(CHARACTERISTIC_LOCK, characteristic id). */
export const CHARACTERISTIC_LOCK = 727_005;
