// The NCR's state flow and what closing asks for. Pure: the router reads the facts, these decide.
import { ncrStatusWords, ncrStepNeedsReason, ncrTransitions, type NcrStatus } from '@shared/schemas/ncrs';
import { conflict, fieldError } from '@api/http/errors';

/** What closing an NCR depends on. */
export interface ClosingFacts {
  rootCauseCategory: string | null;
  rootCauseAnalysis: string | null;
  lotsUndecided: string[];
  actionsOpen: { id: number; description: string }[];
  approved: boolean;
  effectivenessCheck: string | null;
  effective: boolean | null;
}

/** Names listed in one sentence before "and N more": a long list stays readable and bounded. */
const SHOWN = 10;
const listed = (names: string[]) => (names.length <= SHOWN ? names.join(', ') : `${names.slice(0, SHOWN).join(', ')} and ${names.length - SHOWN} more`);
const short = (text: string) => (text.length > 60 ? `${text.slice(0, 57)}…` : text);

/** What still stands in the way of closing, one sentence each; empty when it may be closed. */
export function closingBlockers(f: ClosingFacts): string[] {
  const blockers: string[] = [];
  if (!f.rootCauseCategory) blockers.push('Choose the root cause category.');
  if (!f.rootCauseAnalysis?.trim()) blockers.push('Write the root-cause analysis.');
  if (f.lotsUndecided.length) blockers.push(`Decide the disposition of ${f.lotsUndecided.length === 1 ? 'lot' : `${f.lotsUndecided.length} lots:`} ${listed(f.lotsUndecided)}.`);
  if (f.actionsOpen.length)
    blockers.push(`${f.actionsOpen.length === 1 ? 'One action is' : `${f.actionsOpen.length} actions are`} not done yet: ${listed(f.actionsOpen.map((a) => `#${a.id} “${short(a.description)}”`))}.`);
  if (!f.approved) blockers.push('A quality manager has not approved it yet.');
  if (!f.effectivenessCheck?.trim()) blockers.push('Record the effectiveness check of the actions.');
  else if (f.effective !== true) blockers.push('The effectiveness check has not found the actions effective.');
  return blockers;
}

/**
 * Refuses a step the flow does not allow (409 naming the allowed next states), a step that must say why
 * and does not (400), and closing while something is missing (409 naming each blocker).
 */
export function checkTransition(from: NcrStatus, to: NcrStatus, reason: string | undefined, blockers: string[]): void {
  const allowed = ncrTransitions[from];
  if (!allowed.includes(to)) {
    const next = allowed.map((s) => ncrStatusWords[s]).join(', ');
    throw conflict(`An NCR that is ${ncrStatusWords[from].toLowerCase()} cannot move to ${ncrStatusWords[to].toLowerCase()}; it may move to: ${next}`, allowed.map((s) => ({ path: 'to', message: s })));
  }
  if (ncrStepNeedsReason(from, to) && !reason) throw fieldError('reason', from === 'closed' ? 'Say why the NCR is reopened' : 'Say why the investigation is taken up again');
  if (to === 'closed' && blockers.length) throw conflict(`The NCR cannot be closed yet: ${blockers.join(' ')}`, blockers.map((message) => ({ path: 'closing', message })));
}
