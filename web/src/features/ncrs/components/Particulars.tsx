import { useState } from 'react';
import { ncrSeverities, type NcrSeverity, type NcrView } from '@shared/schemas/ncrs';
import { useUpdateNcr } from '../api/ncrs';
import { severityWords } from '../lib/words';
import { Fact, WriteError } from './Section';
import { useProducts } from '@web/lib/catalogue';
import { usePeople } from '@web/lib/people';
import { PlantTime } from '@web/components/PlantTime';
import { Button } from '@web/components/ui/Button';
import { Input, Select } from '@web/components/ui/Field';
import { TextArea } from '@web/components/ui/TextArea';

const raisedFromWords = { alarms: 'from alarms', lot: 'from a lot', direct: 'directly' } as const;

/** Who raised it and when, product, assignee; managers change title, description, severity, product and assignee here. */
export function Particulars({ ncr, mayManage }: { ncr: NcrView; mayManage: boolean }) {
  const [editing, setEditing] = useState(false);
  if (editing) return <EditParticulars ncr={ncr} onDone={() => setEditing(false)} />;
  return (
    <div className="space-y-3">
      <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-2 lg:grid-cols-4">
        <Fact label="Product">{ncr.product ? `${ncr.product.code} · ${ncr.product.name}` : '—'}</Fact>
        <Fact label="Assignee">{ncr.assignee?.name ?? 'Nobody yet'}</Fact>
        <Fact label="Raised">
          <PlantTime at={ncr.createdAt} className="figures" />
          {ncr.createdBy && ` by ${ncr.createdBy}`}, {raisedFromWords[ncr.raisedFrom]}
        </Fact>
        <Fact label="Last change">
          <PlantTime at={ncr.updatedAt} className="figures" />
        </Fact>
      </dl>
      <div>
        <h2 className="text-sm text-zinc-600">Description</h2>
        <p className="whitespace-pre-line" data-testid="ncr-description">
          {ncr.description}
        </p>
      </div>
      {mayManage && ncr.status !== 'closed' && (
        <Button size="sm" variant="secondary" className="print:hidden" onClick={() => setEditing(true)}>
          Edit title, description, severity, product or assignee
        </Button>
      )}
    </div>
  );
}

function EditParticulars({ ncr, onDone }: { ncr: NcrView; onDone: () => void }) {
  const update = useUpdateNcr(ncr.id);
  const products = useProducts();
  const people = usePeople();
  const [title, setTitle] = useState(ncr.title);
  const [description, setDescription] = useState(ncr.description);
  const [severity, setSeverity] = useState<NcrSeverity>(ncr.severity);
  const [productId, setProductId] = useState(ncr.product ? String(ncr.product.id) : '');
  const [assigneeId, setAssigneeId] = useState(ncr.assignee ? String(ncr.assignee.id) : '');
  return (
    <form
      className="space-y-3 rounded-md border border-zinc-200 bg-zinc-50 px-4 py-3"
      aria-label="Edit the NCR"
      onSubmit={(e) => {
        e.preventDefault();
        update.mutate(
          { title, description, severity, productId: productId ? Number(productId) : null, assigneeId: assigneeId ? Number(assigneeId) : null },
          { onSuccess: onDone },
        );
      }}
    >
      <div className="space-y-1">
        <label htmlFor="ncr-edit-title" className="block text-sm font-medium text-zinc-800">
          Title
        </label>
        <Input id="ncr-edit-title" required minLength={5} maxLength={200} value={title} onChange={(e) => setTitle(e.target.value)} />
      </div>
      <div className="space-y-1">
        <label htmlFor="ncr-edit-description" className="block text-sm font-medium text-zinc-800">
          Description
        </label>
        <TextArea id="ncr-edit-description" rows={5} required minLength={10} maxLength={5000} value={description} onChange={(e) => setDescription(e.target.value)} />
      </div>
      <div className="grid gap-3 sm:grid-cols-3">
        <div className="space-y-1">
          <label htmlFor="ncr-edit-severity" className="block text-sm font-medium text-zinc-800">
            Severity
          </label>
          <Select id="ncr-edit-severity" value={severity} onChange={(e) => setSeverity(e.target.value as NcrSeverity)}>
            {ncrSeverities.map((s) => (
              <option key={s} value={s}>
                {severityWords[s]}
              </option>
            ))}
          </Select>
        </div>
        <div className="space-y-1">
          <label htmlFor="ncr-edit-product" className="block text-sm font-medium text-zinc-800">
            Product
          </label>
          <Select id="ncr-edit-product" value={productId} onChange={(e) => setProductId(e.target.value)}>
            <option value="">None</option>
            {(products.data ?? []).map((p) => (
              <option key={p.id} value={p.id}>
                {p.code} · {p.name}
              </option>
            ))}
          </Select>
        </div>
        <div className="space-y-1">
          <label htmlFor="ncr-edit-assignee" className="block text-sm font-medium text-zinc-800">
            Assignee
          </label>
          <Select id="ncr-edit-assignee" value={assigneeId} onChange={(e) => setAssigneeId(e.target.value)}>
            <option value="">Nobody</option>
            {(people.data ?? []).map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </Select>
        </div>
      </div>
      {update.isError && <WriteError error={update.error} />}
      <div className="flex gap-2">
        <Button type="submit" busy={update.isPending}>
          Save
        </Button>
        <Button variant="secondary" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
