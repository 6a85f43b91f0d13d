// Kept free of zod so the app shell can show role names without loading the validation library.

/** The four roles of Prismline, in order of the menus. */
export const roles = ['technician', 'quality_manager', 'auditor', 'admin'] as const;
export type Role = (typeof roles)[number];

/** Plain-words names of the roles, for menus and tables. */
export const roleLabels: Record<Role, string> = {
  technician: 'QC technician',
  quality_manager: 'Quality manager',
  auditor: 'Auditor (read-only)',
  admin: 'Administrator',
};
