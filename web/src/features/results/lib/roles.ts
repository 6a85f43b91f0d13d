import type { Role } from '@shared/schemas/roles';

/** Who may upload files and enter results; the API checks the same roles on every request. */
export const entryRoles: readonly Role[] = ['technician', 'quality_manager', 'admin'];

/** Who may void an imported upload. */
export const voidRoles: readonly Role[] = ['quality_manager', 'admin'];
