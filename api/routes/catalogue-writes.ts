// What the lines, products and characteristics routers share when the administrator changes the
// catalogue: refusals tied to one field, code claims, lookups by code, the audit action, and the
// answer to a DELETE. Records are never deleted, and codes that records were made under stay.
import type { RequestHandler } from 'express';
import { z } from 'zod';
import { asc, eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { characteristics, plants, productionLines, products, testMethods } from '@api/db/schema';
import { badRequest, fieldError, HttpError, isUniqueViolation } from '@api/http/errors';

export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0];

/** The records that own a code, as a refusal names them. */
type CodeOwner = 'Line' | 'Product' | 'Characteristic';

/** A refusal that concerns one field of the request, so a form can show it under that field. */
export const fieldConflict = (path: string, message: string) => new HttpError(409, message, [{ path, message }]);

/**
 * Runs a write that may take a code in a transaction. A second writer may take the code between our
 * check (refuseTakenCode) and the write: the unique index has the last word, refused like the check.
 */
export async function claimingCode<T>(db: Database, kind: CodeOwner, code: string | undefined, write: (tx: Tx) => Promise<T>): Promise<T> {
  try {
    return await db.transaction(write);
  } catch (err) {
    if (isUniqueViolation(err)) throw fieldConflict('code', `${kind} code ${code} is already in use`);
    throw err;
  }
}

export async function plantId(tx: Tx): Promise<number> {
  const [plant] = await tx.select({ id: plants.id }).from(plants).orderBy(asc(plants.id)).limit(1);
  if (!plant) throw badRequest('No plant is configured yet');
  return plant.id;
}

export async function lineIdFor(tx: Tx, code: string): Promise<number> {
  const [line] = await tx.select({ id: productionLines.id }).from(productionLines).where(eq(productionLines.code, code));
  if (!line) throw fieldError('lineCode', `There is no production line ${code}`);
  return line.id;
}

export async function productIdFor(tx: Tx, code: string): Promise<number> {
  const [product] = await tx.select({ id: products.id }).from(products).where(eq(products.code, code));
  if (!product) throw fieldError('productCode', `There is no product ${code}`);
  return product.id;
}

export async function methodFor(tx: Tx, code: string): Promise<{ id: number; unit: string }> {
  const [method] = await tx.select({ id: testMethods.id, unit: testMethods.unit }).from(testMethods).where(eq(testMethods.code, code));
  if (!method) throw fieldError('testMethodCode', `Test method ${code} is not in the catalogue`);
  return method;
}

/** The owner of a code, named in the refusal: "Line code L1 is already used by Line 1 · levelling compounds". */
export async function refuseTakenCode(tx: Tx, kind: CodeOwner, code: string): Promise<void> {
  const table = { Line: productionLines, Product: products, Characteristic: characteristics }[kind];
  const [other] = await tx.select({ name: table.name }).from(table).where(eq(table.code, code));
  if (other) throw fieldConflict('code', `${kind} code ${code} is already used by ${other.name}`);
}

/** A change of `active` alone is a deactivation or reactivation in the audit trail; anything else an update. */
export const auditAction = (changes: object, active: boolean | undefined) =>
  Object.keys(changes).length === 1 && active !== undefined ? (active ? 'reactivate' : 'deactivate') : 'update';

/** Records are never deleted: a DELETE is answered with what to do instead. */
export const neverDeleted =
  (what: string, instead: string): RequestHandler =>
  (_req, res) => {
    res.set('Allow', 'PATCH');
    throw new HttpError(405, `${what} are never deleted, so that the records made with them stay whole. ${instead}`);
  };

/** The :id of a line, product or characteristic: a positive PostgreSQL integer. */
export const recordId = z.coerce
  .number({ message: 'The id must be a number' })
  .int('The id must be a whole number')
  .positive('The id must be positive')
  .max(2_147_483_647, 'There is no record with so large an id');
