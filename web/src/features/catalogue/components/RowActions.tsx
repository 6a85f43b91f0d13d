import { useState, type ReactNode } from 'react';
import type { ColumnHelper } from '@tanstack/react-table';
import { errorMessage } from '@web/lib/http';
import type { Notice } from '@web/components/ui/Notice';
import { Badge } from '@web/components/ui/Badge';
import { Button } from '@web/components/ui/Button';
import { Dialog } from '@web/components/ui/Dialog';

/** The Status column of lines, products and characteristics. */
export function statusColumn<T extends { active: boolean }>(column: ColumnHelper<T>) {
  return column.accessor((row) => (row.active ? 'Active' : 'Deactivated'), {
    id: 'status',
    header: 'Status',
    cell: (info) => <Badge tone={info.row.original.active ? 'positive' : 'neutral'}>{info.getValue()}</Badge>,
  });
}

/** The Actions column: edit, and deactivate or reactivate, of lines, products and characteristics. */
export function actionsColumn<T extends { id: number; code: string; active: boolean }>(
  column: ColumnHelper<T>,
  {
    onEdit,
    setActive,
    consequences,
    onNotice,
  }: { onEdit: (row: T) => void; setActive: (id: number, active: boolean) => Promise<unknown>; consequences: Consequences; onNotice: (notice: Notice) => void },
) {
  return column.display({
    id: 'actions',
    header: 'Actions',
    cell: (info) => {
      const row = info.row.original;
      return (
        <RowActions code={row.code} active={row.active} onEdit={() => onEdit(row)} setActive={(to) => setActive(row.id, to)} consequences={consequences} onNotice={onNotice} />
      );
    },
  });
}

export interface Consequences {
  /** What deactivating does, for the confirmation. */
  deactivate: ReactNode;
  reactivate: ReactNode;
  /** The notice after deactivating, e.g. "HVL25-FLOW is deactivated: uploads refuse it …". */
  deactivated: (code: string) => string;
}

/**
 * Edit, and deactivate or reactivate after a confirmation that says what follows. Nothing is ever
 * deleted: records made with it stay readable.
 */
export function RowActions({
  code,
  active,
  onEdit,
  setActive,
  consequences,
  onNotice,
}: {
  code: string;
  active: boolean;
  onEdit: () => void;
  setActive: (active: boolean) => Promise<unknown>;
  consequences: Consequences;
  onNotice: (notice: Notice) => void;
}) {
  const [confirming, setConfirming] = useState(false);
  const [busy, setBusy] = useState(false);
  const verb = active ? 'Deactivate' : 'Reactivate';
  const confirm = async () => {
    setBusy(true);
    try {
      await setActive(!active);
      onNotice({ tone: 'success', text: active ? consequences.deactivated(code) : `${code} is active again.` });
    } catch (error) {
      onNotice({ tone: 'error', text: `Could not change ${code}: ${errorMessage(error)}` });
    } finally {
      setBusy(false);
      setConfirming(false);
    }
  };
  return (
    <div className="flex items-center gap-2">
      <Button variant="secondary" size="sm" onClick={onEdit} aria-label={`Edit ${code}`}>
        Edit
      </Button>
      <Button variant="secondary" size="sm" disabled={busy} onClick={() => setConfirming(true)} aria-label={`${verb} ${code}`}>
        {verb}
      </Button>
      {confirming && (
        <Dialog title={`${verb} ${code}?`} onClose={() => setConfirming(false)}>
          <div className="text-zinc-700">{active ? consequences.deactivate : consequences.reactivate}</div>
          <div className="mt-5 flex justify-end gap-2">
            <Button variant="secondary" onClick={() => setConfirming(false)}>
              Cancel
            </Button>
            <Button variant={active ? 'danger' : 'primary'} busy={busy} onClick={confirm}>
              {verb}
            </Button>
          </div>
        </Dialog>
      )}
    </div>
  );
}
