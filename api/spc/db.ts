import type { Database } from '../db/client';

export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0];
/** The pool or an open transaction: the chart is read the same way inside a run's transaction. */
export type Executor = Database | Tx;

export { arr } from '../db/sql';
