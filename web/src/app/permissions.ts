import { may, type Permission } from '@shared/permissions';
import { useSignedInUser } from '@web/lib/session';

/** Whether the signed-in user's role may do the action, read from the one permissions map the API checks too. */
export function useMay(action: Permission): boolean {
  return may(useSignedInUser().role, action);
}
