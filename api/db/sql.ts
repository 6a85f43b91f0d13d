import { sql } from 'drizzle-orm';

/** One array parameter: drizzle would spread a bare JS array into a list of parameters. */
export const arr = (values: unknown[]) => sql.param(values);
