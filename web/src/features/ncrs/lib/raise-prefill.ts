import type { AlarmView } from '@shared/schemas/alarms';
import { MAX_INT32 } from '@shared/schemas/fields';

// What a new NCR raised from alarms starts with: the product of their characteristics, each lot once, and a
// title in a line. A person reads and changes all of it before raising.

export interface RaisePrefill {
  title: string;
  /** Product code when every alarm is on one product, else empty (the person chooses). */
  productCode: string;
  lotNumbers: string[];
}

export function prefillFromAlarms(alarms: readonly AlarmView[]): RaisePrefill {
  if (alarms.length === 0) return { title: '', productCode: '', lotNumbers: [] };
  const lotNumbers = [...new Set(alarms.map((a) => a.lot.lotNumber))];
  const products = [...new Set(alarms.map((a) => a.characteristic.productCode))];
  const characteristics = [...new Set(alarms.map((a) => a.characteristic.code))];
  const signals = alarms.length === 1 ? alarms[0].signal : `${alarms.length} signals`;
  const what = characteristics.length === 1 ? `${characteristics[0]}: ${signals}` : `${signals} on ${characteristics.length} characteristics of ${products.join(', ')}`;
  const where = lotNumbers.length === 1 ? `lot ${lotNumbers[0]}` : `${lotNumbers.length} lots`;
  return { title: `${what} — ${where}`.slice(0, 200), productCode: products.length === 1 ? products[0] : '', lotNumbers };
}

/** The alarm ids of `?alarms=1,2,3`: whole positive numbers, each once, at most 100 (what the API takes). */
export function alarmIdsOf(param: string | null): number[] {
  if (!param) return [];
  const ids = param
    .split(',')
    .map((s) => s.trim())
    .filter((s) => /^\d{1,10}$/.test(s))
    .map(Number)
    .filter((n) => n >= 1 && n <= MAX_INT32);
  return [...new Set(ids)].slice(0, 100);
}
