import type { SpecRevision } from '@web/lib/specifications';

export type RevisionState = 'in force' | 'scheduled' | 'superseded';

/**
 * The state of a revision, given the one the API reports in force (its clock decides, not the browser's).
 * Revisions follow each other in time, so a higher number than the one in force has not taken effect yet.
 */
export function revisionState(revision: Pick<SpecRevision, 'revision'>, inForce: number | null): RevisionState {
  if (inForce === null || revision.revision > inForce) return 'scheduled';
  return revision.revision === inForce ? 'in force' : 'superseded';
}
