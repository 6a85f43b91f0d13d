// Who may do what: the one map the API's role checks, the web's guards, menus and buttons, and the
// authorisation tests read. Kept free of zod so the app shell can load it without the validation library.
import type { Role } from './schemas/roles';

const everyone = ['technician', 'quality_manager', 'auditor', 'admin'] as const satisfies readonly Role[];
const labStaff = ['technician', 'quality_manager', 'admin'] as const satisfies readonly Role[];
const managers = ['quality_manager', 'admin'] as const satisfies readonly Role[];
const reviewers = ['quality_manager', 'auditor', 'admin'] as const satisfies readonly Role[];
const admins = ['admin'] as const satisfies readonly Role[];

/** Each action a user may be allowed or refused, and the roles allowed it. */
export const permissions = {
  /** Read the overview, charts, results, test methods, specifications, runs and own e-mail alerts. */
  'plant.read': everyone,
  /** Upload a results file. */
  'upload.create': labStaff,
  /** Void an imported upload (its results leave every calculation, kept for the record). */
  'upload.void': managers,
  /** Type in a lot's results. */
  'measurement.create': labStaff,
  /** Correct one stored result, with a reason. */
  'measurement.correct': labStaff,
  /** Save a column mapping for a lab export. */
  'column-mapping.create': labStaff,
  /** Record a process event (new sand source, press recalibrated). */
  'process-event.create': labStaff,
  /** Issue a new specification revision. */
  'specification.revise': managers,
  /** Freeze, recalculate or unfreeze control limits. */
  'limits.freeze': managers,
  /** Exclude a point from the limit estimate, or include it again. */
  'point.exclude': managers,
  /** Start an SPC run by hand. */
  'spc-run.start': managers,
  /** Read the alarms, their comments and investigations (only managers triage them). */
  'alarm.read': everyone,
  /** Triage alarms: acknowledge (one or many), investigate, close with an outcome, reopen, assign, comment, group under an investigation. */
  'alarm.triage': managers,
  /** Put a lot on hold, with a reason. */
  'lot.hold': labStaff,
  /** Release a held lot, with a reason. */
  'lot.release': managers,
  /** Read nonconformance reports. */
  'ncr.read': everyone,
  /** Raise an NCR, and add evidence to one (attachments, an action's evidence and done date). */
  'ncr.raise': labStaff,
  /** Assign, edit, approve, disposition lots of, move and close an NCR; add and change its actions. */
  'ncr.manage': managers,
  /** Read capability reports: preview, PDF and CSV. */
  'report.read': reviewers,
  /** Read, verify and export the audit trail, and download the audit pack that holds it. */
  'audit.read': ['auditor', 'admin'],
  /** Add, change, deactivate lines, products and characteristics. */
  'catalogue.manage': admins,
  /** Set the plant's date format (its time zone is read-only). */
  'plant.manage': admins,
  /** Create users, change their roles, deactivate them. */
  'user.manage': admins,
  /** Read the log of the e-mails Prismline sent (to whom, when, what). */
  'mail.read': managers,
  /** Read the local fake mail server's outbox. */
  'outbox.read': admins,
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof permissions;

/** Whether the role may do the action. */
export function may(role: Role, action: Permission): boolean {
  return (permissions[action] as readonly Role[]).includes(role);
}
