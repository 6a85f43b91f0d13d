// How each audit event reads in the trail: one sentence per entity and action, in the lab's words, and the
// page of what it is about. The map's type lists every pair of audit-actions.ts, so a new action fails the
// typecheck until it has its sentence. Sentences have no subject: the trail names who did it beside them.
import { alarmOutcomeWords, alarmStatusWords, type AlarmOutcome, type AlarmStatus } from '@shared/schemas/alarms';
import { lotDispositionWords, ncrStatusWords, type LotDisposition, type NcrStatus } from '@shared/schemas/ncrs';
import { auditActions, type AuditAction, type AuditEntity } from '@api/db/audit-actions';

/** What a sentence may draw on: the stored id, a readable name where the list found one, before and after. */
export interface EventFacts {
  id: string;
  /** The NCR's number, the characteristic's code: what people call the record; null when only the id is known. */
  label: string | null;
  before: Record<string, unknown>;
  after: Record<string, unknown>;
}

type Sentence = (e: EventFacts) => string;

const text = (v: unknown): string | null => (typeof v === 'string' && v.trim() ? v : typeof v === 'number' ? String(v) : null);
const name = (e: EventFacts) => e.label ?? e.id;
const words = <K extends string>(table: Record<K, string>, v: unknown): string | null =>
  typeof v === 'string' && Object.hasOwn(table, v) ? table[v as K].toLowerCase() : null;
const suffix = (part: string | null, join = ': ') => (part ? `${join}${part}` : '');

export const auditSentences: { [E in AuditEntity]: Record<AuditAction<E>, Sentence> } = {
  alarm: {
    acknowledge: (e) => `Acknowledged alarm ${e.id}`,
    close: (e) => `Closed alarm ${e.id}${suffix(words<AlarmOutcome>(alarmOutcomeWords, e.after.outcome))}`,
    'close-automatically': (e) => `Closed alarm ${e.id} automatically: after a change of data its signal is no longer there`,
    investigate: (e) => `Started the investigation of alarm ${e.id}`,
    reopen: (e) => `Reopened alarm ${e.id}${suffix(words<AlarmStatus>(alarmStatusWords, e.before.status), ', which was ')}`,
    assign: (e) => (e.after.assigneeId == null ? `Took alarm ${e.id} off its assignee` : `Assigned alarm ${e.id} to someone to look into`),
    comment: (e) => `Commented on alarm ${e.id}`,
    group: (e) => (e.after.groupId == null ? `Took alarm ${e.id} out of its investigation` : `Grouped alarm ${e.id} under investigation${suffix(text(e.after.groupId), ' ')}`),
    'raise falling capability': (e) => `Raised alarm ${e.id}: process capability fell below its threshold`,
  },
  'alarm group': {
    create: (e) => `Opened investigation ${e.id}, which groups alarms of one cause`,
    update: (e) => `Changed investigation ${e.id}`,
  },
  'alarm subscription': {
    subscribe: () => 'Subscribed to alarm e-mails',
    update: () => 'Changed which alarm e-mails to receive',
    unsubscribe: () => 'Unsubscribed from alarm e-mails',
  },
  characteristic: {
    create: (e) => `Added characteristic ${name(e)}`,
    update: (e) => `Changed the settings of characteristic ${name(e)}`,
    deactivate: (e) => `Deactivated characteristic ${name(e)}: no new results are taken for it`,
    reactivate: (e) => `Reactivated characteristic ${name(e)}`,
    'revise specification': (e) => `Issued specification revision${suffix(text(e.after.revision), ' ')} for ${name(e)}`,
    'freeze limits': (e) => `Set control limits of ${name(e)}${suffix(text(e.after.revision), ', revision ')}`,
    'exclude point': (e) => `Excluded a lot from the control limits of ${name(e)}`,
    'include point': (e) => `Took a lot back into the control limits of ${name(e)}`,
  },
  'column mapping': {
    create: (e) => `Saved a column mapping for lab exports${suffix(text(e.after.name), ' named ')}`,
  },
  lot: {
    hold: (e) => `Put lot ${e.id} on hold`,
    'hold automatically': (e) => (e.after.source === 'out-of-spec' ? `Held lot ${e.id} automatically: a result is outside the specification` : `Held lot ${e.id} automatically`),
    release: (e) => `Released lot ${e.id} from hold`,
    disposition: (e) => `Decided the disposition of lot ${e.id}${suffix(words<LotDisposition>(lotDispositionWords, e.after.disposition))}`,
  },
  measurement: {
    'manual entry': (e) => `Entered${suffix(text(e.after.rowsImported), ' ')} results by hand`,
    correct: (e) => `Corrected result ${e.id}`,
  },
  ncr: {
    raise: (e) => `Raised NCR ${text(e.after.number) ?? name(e)}${suffix(text(e.after.title))}`,
    update: (e) => `Edited NCR ${name(e)}`,
    transition: (e) => `Moved NCR ${name(e)}${suffix(words<NcrStatus>(ncrStatusWords, e.after.status), ' to ')}`,
    assign: (e) => (text(e.after.assigneeName) ? `Assigned NCR ${name(e)} to ${text(e.after.assigneeName)}` : `Took NCR ${name(e)} off its assignee`),
    approve: (e) => `Approved the actions of NCR ${name(e)}`,
    'add lots': (e) => `Added lots to NCR ${name(e)}`,
    'link alarms': (e) => `Linked alarms to NCR ${name(e)}`,
    disposition: (e) => `Decided a lot's disposition under NCR ${name(e)}${suffix(words<LotDisposition>(lotDispositionWords, e.after.disposition))}`,
    'add action': (e) => `Added a corrective or preventive action to NCR ${name(e)}`,
    'update action': (e) => `Updated an action of NCR ${name(e)}`,
    'attach file': (e) => `Attached a file to NCR ${name(e)}`,
  },
  plant: {
    update: () => 'Changed the plant settings',
  },
  'process event': {
    'record event': (e) => `Recorded a process event${suffix(text(e.after.title))}`,
  },
  product: {
    create: (e) => `Added product ${name(e)}`,
    update: (e) => `Changed product ${name(e)}`,
    deactivate: (e) => `Deactivated product ${name(e)}`,
    reactivate: (e) => `Reactivated product ${name(e)}`,
  },
  'production line': {
    create: (e) => `Added production line ${name(e)}`,
    update: (e) => `Changed production line ${name(e)}`,
    deactivate: (e) => `Deactivated production line ${name(e)}`,
    reactivate: (e) => `Reactivated production line ${name(e)}`,
  },
  'spc run': {
    start: (e) => `Started SPC run ${e.id}`,
  },
  upload: {
    import: (e) => `Imported upload ${e.id}${suffix(text(e.after.fileName), ', file ')}`,
    reject: (e) => `Refused upload ${e.id}: rows failed the checks and nothing was stored`,
    void: (e) => `Voided upload ${e.id}: its results leave every calculation and stay on record`,
  },
  user: {
    'sign-in': () => 'Signed in',
    'sign-in refused': () => 'A sign-in was refused',
    'sign-out': () => 'Signed out',
    create: (e) => `Created user account ${name(e)}`,
    update: (e) => `Changed user account ${name(e)}`,
    'update (password reset)': (e) => `Reset the password of user account ${name(e)}`,
  },
};

const record = (v: unknown): Record<string, unknown> => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : {});

/** The sentence of a stored event; an entity or action the list does not know (written by an older version) reads plainly. */
export function auditSentence(entity: string, action: string, facts: { id: string | null; label: string | null; before: unknown; after: unknown }): string {
  const e: EventFacts = { id: facts.id ?? '', label: facts.label, before: record(facts.before), after: record(facts.after) };
  const forEntity = Object.hasOwn(auditActions, entity) ? (auditSentences[entity as AuditEntity] as Record<string, Sentence>) : null;
  const say = forEntity && Object.hasOwn(forEntity, action) ? forEntity[action] : null;
  return say ? say(e) : `${action} ${entity}${facts.id ? ` ${facts.id}` : ''}`;
}

const wholeNumber = /^[1-9][0-9]{0,9}$/;

/** The web page of the record an event is about, where it has one. */
export function auditLink(entity: string, entityId: string | null): string | null {
  if (!entityId) return null;
  switch (entity) {
    case 'lot':
      return `/results/lots/${encodeURIComponent(entityId)}`;
    case 'ncr':
      return wholeNumber.test(entityId) ? `/ncrs/${entityId}` : null;
    case 'alarm':
      return wholeNumber.test(entityId) ? `/alarms/${entityId}` : null;
    case 'characteristic':
      return wholeNumber.test(entityId) ? `/charts/${entityId}` : null;
    case 'upload':
      return '/results/history';
    default:
      return null;
  }
}
