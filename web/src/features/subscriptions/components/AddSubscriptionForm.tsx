import { useState } from 'react';
import { useCreateSubscription, type Scope } from '../api/subscriptions';
import { errorMessage } from '@web/lib/http';
import { Field, Select } from '@web/components/ui/Field';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';

/** Scope values are "line:<id>" or "product:<id>" so that one select offers both. */
export function AddSubscriptionForm({ scope }: { scope: Scope }) {
  const create = useCreateSubscription();
  const [target, setTarget] = useState('');
  const [immediate, setImmediate] = useState(true);
  const [digest, setDigest] = useState(true);

  return (
    <form
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        const [kind, id] = target.split(':');
        create.mutate({ ...(kind === 'line' ? { lineId: Number(id) } : { productId: Number(id) }), immediate, digest }, { onSuccess: () => setTarget('') });
      }}
    >
      <Field label="Product line or product" hint="A line covers every product made on it.">
        {({ id, describedBy }) => (
          <Select id={id} describedBy={describedBy} value={target} required onChange={(e) => setTarget(e.target.value)}>
            <option value="">Choose…</option>
            <optgroup label="Product lines">
              {scope.lines.map((l) => (
                <option key={`l${l.id}`} value={`line:${l.id}`}>
                  {l.code} · {l.name}
                </option>
              ))}
            </optgroup>
            <optgroup label="Products">
              {scope.products.map((p) => (
                <option key={`p${p.id}`} value={`product:${p.id}`}>
                  {p.code} · {p.name}
                </option>
              ))}
            </optgroup>
          </Select>
        )}
      </Field>
      <fieldset className="space-y-2">
        <legend className="text-sm font-medium text-zinc-800">Which e-mails</legend>
        <label className="flex items-start gap-2">
          <input type="checkbox" className="mt-1" checked={immediate} onChange={(e) => setImmediate(e.target.checked)} />
          <span>
            At once: out-of-specification results and points beyond a control limit
          </span>
        </label>
        <label className="flex items-start gap-2">
          <input type="checkbox" className="mt-1" checked={digest} onChange={(e) => setDigest(e.target.checked)} />
          <span>Morning digest of the night’s new alarms</span>
        </label>
      </fieldset>
      {create.isError && <Alert tone="error">{errorMessage(create.error)}</Alert>}
      <Button type="submit" busy={create.isPending} disabled={!target || (!immediate && !digest)}>
        Subscribe
      </Button>
    </form>
  );
}
