import type { Role } from '@shared/schemas/roles';

/** Who may add a specification revision; the API checks the same roles on every request. */
export const specificationRoles: readonly Role[] = ['quality_manager', 'admin'];

/** Who may record a process event. */
export const processEventRoles: readonly Role[] = ['technician', 'quality_manager', 'admin'];
