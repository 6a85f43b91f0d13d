// Every change the audit trail records, entity by entity: recordAudit accepts only these pairs, so a
// misspelt action or entity fails the typecheck. A new kind of change is added here first. The words
// are stored as they stand; renaming one would split the trail of existing records.

export const auditActions = {
  alarm: ['acknowledge', 'close', 'close-automatically', 'investigate', 'reopen', 'assign', 'comment', 'group', 'raise falling capability'],
  'alarm group': ['create', 'update'],
  'alarm subscription': ['subscribe', 'update', 'unsubscribe'],
  characteristic: ['create', 'update', 'deactivate', 'reactivate', 'revise specification', 'freeze limits', 'exclude point', 'include point'],
  'column mapping': ['create'],
  lot: ['hold', 'hold automatically', 'release', 'disposition'],
  measurement: ['manual entry', 'correct'],
  ncr: ['raise', 'update', 'transition', 'assign', 'approve', 'add lots', 'link alarms', 'disposition', 'add action', 'update action', 'attach file'],
  plant: ['update'],
  'process event': ['record event'],
  product: ['create', 'update', 'deactivate', 'reactivate'],
  'production line': ['create', 'update', 'deactivate', 'reactivate'],
  'spc run': ['start'],
  upload: ['import', 'reject', 'void'],
  user: ['sign-in', 'sign-in refused', 'sign-out', 'create', 'update', 'update (password reset)'],
} as const satisfies Record<string, readonly string[]>;

export type AuditEntity = keyof typeof auditActions;
export type AuditAction<E extends AuditEntity = AuditEntity> = (typeof auditActions)[E][number];
