import { roleLabels, roles } from '@shared/schemas/users';

/** The <option>s of a role select, in the order and words of the shared role list. */
export function RoleOptions() {
  return roles.map((role) => (
    <option key={role} value={role}>
      {roleLabels[role]}
    </option>
  ));
}
