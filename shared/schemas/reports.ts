// Capability reports: the request the report page and the API share, and the preview the API answers
// with. A report is built from the chart computation itself (the chart endpoint's figures for the same
// window), so the preview, the PDF, the CSV and the chart page give the same numbers.
import { z } from 'zod';
import type { CapabilityResult } from '../spc';
import { MAX_INT32, plantDay, recordId } from './fields';

/** A report covers at most this many plant days (about five years): longer asks would only make a huge file. */
export const REPORT_MAX_DAYS = 1827;
/** A product has a dozen characteristics or so; the cap keeps one request from naming thousands. */
export const REPORT_MAX_CHARACTERISTICS = 60;

const dayNumber = (day: string) => Date.UTC(Number(day.slice(0, 4)), Number(day.slice(5, 7)) - 1, Number(day.slice(8, 10))) / 86_400_000;

/** A comma-separated list of characteristic ids ("12,14"), each a whole number the database can hold. */
const idList = z
  .string({ message: 'Give the characteristics as a comma-separated list of ids' })
  .regex(/^\d{1,10}(,\d{1,10})*$/, 'Give the characteristics as a comma-separated list of ids')
  .transform((text) => [...new Set(text.split(',').map(Number))])
  .refine((ids) => ids.every((id) => id > 0 && id <= MAX_INT32), 'A characteristic id is out of range')
  .refine((ids) => ids.length <= REPORT_MAX_CHARACTERISTICS, `Choose at most ${REPORT_MAX_CHARACTERISTICS} characteristics`);

/**
 * GET /api/v1/reports/capability(.pdf|.csv)?characteristic=<id> | product=<id>[&characteristics=<id,id>]&from=&to=
 * — one characteristic, or a product's characteristics (all, or the ones listed), over plant days from–to inclusive.
 */
export const capabilityReportQuerySchema = z
  .object({
    /** One characteristic's report. */
    characteristic: recordId('Characteristic id').optional(),
    /** A product's report: a summary, then one section per characteristic. */
    product: recordId('Product id').optional(),
    /** With product: only these characteristics of it (all when absent). */
    characteristics: idList.optional(),
    /** First plant day of the period. */
    from: plantDay('the first day of the period'),
    /** Last plant day of the period (inclusive). */
    to: plantDay('the last day of the period'),
  })
  .refine((q) => (q.characteristic === undefined) !== (q.product === undefined), {
    path: ['product'],
    message: 'Choose either one characteristic or one product',
  })
  .refine((q) => q.characteristics === undefined || q.product !== undefined, {
    path: ['characteristics'],
    message: 'A list of characteristics goes with a product',
  })
  .refine((q) => q.from <= q.to, { path: ['to'], message: 'The period must not end before it starts' })
  .refine((q) => dayNumber(q.to) - dayNumber(q.from) < REPORT_MAX_DAYS, {
    path: ['to'],
    message: `A report covers at most ${REPORT_MAX_DAYS} days (five years); choose a shorter period`,
  });
export type CapabilityReportQuery = z.infer<typeof capabilityReportQuerySchema>;

/**
 * GET /api/v1/reports/audit-pack.zip?product=<id>&from=&to= — a product and a period, read by the report's own
 * rules (the pack holds the product's report); a single characteristic or a choice of them is not a pack.
 */
export const auditPackQuerySchema = capabilityReportQuerySchema
  .refine((q) => q.product !== undefined && q.characteristic === undefined && q.characteristics === undefined, {
    path: ['product'],
    message: 'An audit pack is made for one product and all its characteristics: give product, from and to',
  })
  .transform((q) => ({ product: q.product!, from: q.from, to: q.to }));
export type AuditPackQuery = z.infer<typeof auditPackQuerySchema>;

/** The query as the web app puts it in a link (ids and plant days as text). */
export function capabilityReportSearch(q: CapabilityReportQuery): string {
  const p = new URLSearchParams();
  if (q.characteristic !== undefined) p.set('characteristic', String(q.characteristic));
  if (q.product !== undefined) p.set('product', String(q.product));
  if (q.characteristics?.length) p.set('characteristics', q.characteristics.join(','));
  p.set('from', q.from);
  p.set('to', q.to);
  return p.toString();
}

/** One characteristic's figures in the preview: the chart endpoint's for the same window. */
export interface CharacteristicReportSummary {
  id: number;
  code: string;
  name: string;
  unit: string;
  decimals: number;
  testMethod: { code: string; name: string; standard: string };
  /** Lots charted in the period (one subgroup each) and how many of them are excluded from the limits. */
  subgroups: number;
  excluded: number;
  /** The specification the indices are computed against: the revision in force when the report is made, as on the chart. */
  spec: { lsl: number | null; usl: number | null; target: number | null; revision: number } | null;
  capability: CapabilityResult | null;
  /** The engine's cautions ("preliminary", "not normal", trial limits, …), as the chart page shows them. */
  warnings: string[];
  /** Run-rule and out-of-specification signals on lots of the period, and how many are still open. */
  signals: { total: number; open: number };
  /** NCRs that touch the characteristic in the period. */
  ncrs: number;
  /** SHA-256 of this characteristic's canonical input (subgroups, specification, limits). */
  inputHash: string;
}

/** GET /api/v1/reports/capability */
export interface CapabilityReportPreview {
  plant: { name: string; timeZone: string };
  product: { id: number; code: string; name: string };
  /** The period as plant days, and the production-time window they stand for (the chart's from and to). */
  period: { from: string; to: string; fromInstant: string; toInstant: string };
  /** SHA-256 of the report's whole input: the PDF's footer and the CSV's header carry the same. */
  inputHash: string;
  characteristics: CharacteristicReportSummary[];
}
