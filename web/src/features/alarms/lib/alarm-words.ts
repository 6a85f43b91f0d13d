import { ApiError } from '@web/lib/http';
import { alarmStatusWords, type AlarmStatus, type AlarmView } from '@shared/schemas/alarms';
import { signalNames } from '@shared/spc';

/** The chart at the alarm's lot, inside the app (the API's chartUrl is the e-mail's absolute address of the same page). */
export const chartPath = (a: Pick<AlarmView, 'characteristic' | 'lot'>) => `/charts/${a.characteristic.id}?${new URLSearchParams({ lot: a.lot.lotNumber })}`;

export const alarmPath = (id: number) => `/alarms/${id}`;

/** The NCR form with these alarms named (another area builds that page). */
export const raiseNcrPath = (ids: number[]) => `/ncrs/new?alarms=${ids.join(',')}`;

export const signalTone = (rule: string) => (rule === 'out-of-spec' ? 'negative' : rule === 'we1' || rule === 'capability' ? 'warning' : 'neutral');

export const statusTone = (s: AlarmStatus) => (s === 'open' ? 'negative' : s === 'closed' ? 'positive' : s === 'investigating' ? 'accent' : 'warning');

export const statusWord = (s: AlarmStatus) => alarmStatusWords[s];

/** The signals a person can filter by, in words. */
export const signalOptions = Object.entries(signalNames).map(([rule, label]) => ({ rule, label }));

/** The server's field messages of a refusal (`details`), by field; empty for any other error. */
export function fieldMessages(error: unknown): Record<string, string> {
  if (!(error instanceof ApiError)) return {};
  return Object.fromEntries(error.details.map((d) => [d.path, d.message]));
}
