import type { Role } from '@shared/schemas/roles';
import { may, type Permission } from '@shared/permissions';

/** Every area of the app. The router builds its routes from this list and the menu shows it by role. */
export type AreaId = 'overview' | 'charts' | 'results' | 'methods' | 'records' | 'alarms' | 'runs' | 'ncrs' | 'reports' | 'audit-trail' | 'subscriptions' | 'mail-log' | 'users' | 'catalogue' | 'plant' | 'outbox';

export interface Area {
  id: AreaId;
  path: string;
  /** Menu label and page heading. */
  label: string;
  /** One sentence of what the area is for, shown until the area is built. */
  purpose: string;
  /** The action that opens the area. The server checks permissions on every request too; this only shapes the menu and routes. */
  permission: Permission;
  group: 'work' | 'administration';
}

export const areas: readonly Area[] = [
  {
    id: 'overview',
    path: '/',
    label: 'Plant overview',
    purpose: 'The state of each line and product at a glance: open alarms, lots on hold and the latest results.',
    permission: 'plant.read',
    group: 'work',
  },
  {
    id: 'charts',
    path: '/charts',
    label: 'Control charts',
    purpose:
      'Control charts per product and characteristic, with centre line, control limits, run-rule signals and capability indices (Cp, Cpk, Pp, Ppk).',
    permission: 'plant.read',
    group: 'work',
  },
  {
    id: 'results',
    path: '/results',
    label: 'Results & uploads',
    purpose:
      "Enter a shift's test results by hand or upload them as CSV from lab instruments or a spreadsheet, and correct rejected rows.",
    // Auditors read the upload history and the lots here; entering and uploading stay with the other roles.
    permission: 'plant.read',
    group: 'work',
  },
  {
    id: 'methods',
    path: '/test-methods',
    label: 'Test methods',
    purpose: 'How each characteristic is tested: standard, unit, possible range, how a machine reading becomes a result, and the handling cautions.',
    permission: 'plant.read',
    group: 'work',
  },
  {
    id: 'records',
    path: '/records',
    label: 'Specifications & events',
    purpose:
      'Specification limits per characteristic with every revision, and the process events (new sand source, press recalibrated) that mark the control charts.',
    // Everyone reads; quality managers and administrators revise specifications, the lab staff record events.
    permission: 'plant.read',
    group: 'work',
  },
  {
    id: 'alarms',
    path: '/alarms',
    label: 'Alarms',
    purpose:
      'What the nightly SPC run flagged — out-of-control signals, out-of-specification results and falling capability — for review and a decision on assignable cause.',
    permission: 'alarm.read',
    group: 'work',
  },
  {
    id: 'runs',
    path: '/spc-runs',
    label: 'SPC runs',
    purpose: 'The nightly and on-demand recomputation of every control chart, followed live, with any characteristic that failed and why.',
    permission: 'plant.read',
    group: 'work',
  },
  {
    id: 'ncrs',
    path: '/ncrs',
    label: 'Nonconformance reports',
    purpose:
      'Raise and follow nonconformance reports from containment and lot hold through root cause and CAPA to disposition.',
    permission: 'ncr.read',
    group: 'work',
  },
  {
    id: 'reports',
    path: '/reports',
    label: 'Capability reports',
    purpose:
      'Capability of a characteristic or a whole product over a period, as PDF and CSV, and the audit pack — evidence for factory production control audits.',
    permission: 'report.read',
    group: 'work',
  },
  {
    id: 'audit-trail',
    path: '/audit-trail',
    label: 'Audit trail',
    purpose: 'Who entered or changed which record, when and why, before and after; checked link by link against tampering, and exported as CSV.',
    permission: 'audit.read',
    group: 'work',
  },
  {
    id: 'subscriptions',
    path: '/subscriptions',
    label: 'Alerts by e-mail',
    purpose: 'Which product lines and products send you alarm e-mails: at once, in the morning digest, or both.',
    permission: 'plant.read',
    group: 'work',
  },
  {
    id: 'mail-log',
    path: '/mail-log',
    label: 'Sent e-mail',
    purpose: 'The alarm e-mails and morning digests that went out: when, to whom, what they said, and any still waiting to be sent.',
    permission: 'mail.read',
    group: 'work',
  },
  {
    id: 'users',
    path: '/admin/users',
    label: 'Users',
    purpose: 'Who may sign in to Prismline and in which role.',
    permission: 'user.manage',
    group: 'administration',
  },
  {
    id: 'catalogue',
    path: '/admin/catalogue',
    label: 'Products, lines & characteristics',
    purpose:
      'The products made on each production line and the characteristics the lab tests on them.',
    permission: 'catalogue.manage',
    group: 'administration',
  },
  {
    id: 'plant',
    path: '/admin/plant',
    label: 'Plant settings',
    purpose: "The plant's date format, in which every page shows and takes dates, beside its time zone.",
    permission: 'plant.manage',
    group: 'administration',
  },
  {
    id: 'outbox',
    path: '/admin/outbox',
    label: 'Mail outbox',
    purpose: 'The e-mails the local test mail server has received, while no mail relay is configured.',
    permission: 'outbox.read',
    group: 'administration',
  },
];

/** The menu for one role, in menu order. */
export function areasFor(role: Role): Area[] {
  return areas.filter((area) => may(role, area.permission));
}
