import { ncrSeverities, ncrStatuses, type NcrSeverity, type NcrStatus } from '@shared/schemas/ncrs';
import { MAX_INT32 } from '@shared/schemas/fields';

// The NCR list's filter lives in the address (?status=open&overdue=1&q=L1-26), so a filtered list can be
// bookmarked, shared and reached with the browser's back button. What the address holds that makes no
// sense (an unknown state, a product id that is no number) is left out rather than sent to the server.

export interface NcrListSearch {
  status?: NcrStatus;
  severity?: NcrSeverity;
  productId?: number;
  assigneeId?: number;
  overdue: boolean;
  q: string;
}

const id = (text: string | null): number | undefined => {
  if (!text || !/^\d{1,10}$/.test(text)) return undefined;
  const n = Number(text);
  return n >= 1 && n <= MAX_INT32 ? n : undefined;
};

const oneOf = <T extends string>(values: readonly T[], text: string | null): T | undefined => (values as readonly string[]).includes(text ?? '') ? (text as T) : undefined;

export function readNcrListSearch(params: URLSearchParams): NcrListSearch {
  return {
    status: oneOf(ncrStatuses, params.get('status')),
    severity: oneOf(ncrSeverities, params.get('severity')),
    productId: id(params.get('product')),
    assigneeId: id(params.get('assignee')),
    overdue: params.get('overdue') === '1',
    q: (params.get('q') ?? '').trim().slice(0, 100),
  };
}

/** The address's search part for a filter: only what narrows the list, in a fixed order. */
export function ncrListSearchParams(search: NcrListSearch): URLSearchParams {
  const params = new URLSearchParams();
  if (search.status) params.set('status', search.status);
  if (search.severity) params.set('severity', search.severity);
  if (search.productId) params.set('product', String(search.productId));
  if (search.assigneeId) params.set('assignee', String(search.assigneeId));
  if (search.overdue) params.set('overdue', '1');
  if (search.q) params.set('q', search.q);
  return params;
}
