// Query keys of the NCRs, shared by the NCR pages and the overview's list of actions due: a change to an
// NCR (an action done, a new due date) invalidates `ncrKeys.all`, which refreshes both.

export interface NcrListFilter {
  status?: string;
  severity?: string;
  productId?: number;
  assigneeId?: number;
  overdue?: boolean;
  q?: string;
  limit: number;
}

export const ncrKeys = {
  all: ['ncrs'] as const,
  list: (filter: NcrListFilter) => [...ncrKeys.all, 'list', filter] as const,
  detail: (id: number) => [...ncrKeys.all, 'detail', id] as const,
  actionsDue: () => [...ncrKeys.all, 'actions-due'] as const,
};
