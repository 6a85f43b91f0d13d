import { sql } from 'drizzle-orm';

/** One array parameter: drizzle would spread a bare JS array into a list of parameters. */
export const arr = (values: unknown[]) => sql.param(values);

/**
 * Runs queries one after another and answers their results in order, like Promise.all over thunks. A
 * transaction is one connection, and node-postgres deprecates sending it a query while another runs.
 */
export async function inTurn<const T extends readonly (() => Promise<unknown>)[]>(queries: T): Promise<{ [K in keyof T]: Awaited<ReturnType<T[K]>> }> {
  const out: unknown[] = [];
  for (const q of queries) out.push(await q());
  return out as { [K in keyof T]: Awaited<ReturnType<T[K]>> };
}
