import { useState } from 'react';
import type { NcrView } from '@shared/schemas/ncrs';
import { useUpdateNcr } from '../api/ncrs';
import { Section, WriteError } from './Section';
import { PlantTime } from '@web/components/PlantTime';
import { Button } from '@web/components/ui/Button';
import { TextArea } from '@web/components/ui/TextArea';

const verdict = (effective: boolean | null) => (effective === null ? 'No verdict yet' : effective ? 'Effective' : 'Not effective');

/** How the effectiveness of the actions was checked, the verdict, and who closed the NCR when. */
export function Closure({ ncr, mayManage }: { ncr: NcrView; mayManage: boolean }) {
  const update = useUpdateNcr(ncr.id);
  const [editing, setEditing] = useState(false);
  const [check, setCheck] = useState(ncr.effectivenessCheck ?? '');
  const [effective, setEffective] = useState<'' | 'yes' | 'no'>(ncr.effective === null ? '' : ncr.effective ? 'yes' : 'no');
  const editable = mayManage && ncr.status !== 'closed';
  return (
    <Section
      id="closure"
      title="Effectiveness and closure"
      aside={
        editable &&
        !editing && (
          <Button size="sm" variant="secondary" className="print:hidden" onClick={() => setEditing(true)}>
            {ncr.effectivenessCheck ? 'Change the check' : 'Record the effectiveness check'}
          </Button>
        )
      }
    >
      {editing ? (
        <form
          className="space-y-3"
          aria-label="Effectiveness check"
          onSubmit={(e) => {
            e.preventDefault();
            update.mutate({ effectivenessCheck: check.trim() || null, effective: effective === '' ? null : effective === 'yes' }, { onSuccess: () => setEditing(false) });
          }}
        >
          <label htmlFor="ncr-effectiveness" className="block text-sm font-medium text-zinc-800">
            Effectiveness check
          </label>
          <TextArea id="ncr-effectiveness" rows={4} minLength={10} maxLength={5000} value={check} onChange={(e) => setCheck(e.target.value)} />
          <p className="text-sm text-zinc-600">How it was checked that the actions worked: the lots and results looked at since, over what period.</p>
          <fieldset>
            <legend className="text-sm font-medium text-zinc-800">Were the actions effective?</legend>
            <div className="mt-1 flex gap-5">
              {(['yes', 'no'] as const).map((v) => (
                <label key={v} className="flex items-center gap-2">
                  <input type="radio" name="ncr-effective" value={v} checked={effective === v} onChange={() => setEffective(v)} />
                  {v === 'yes' ? 'Yes, effective' : 'No, not effective'}
                </label>
              ))}
            </div>
          </fieldset>
          {update.isError && <WriteError error={update.error} />}
          <div className="flex gap-2">
            <Button type="submit" busy={update.isPending}>
              Save the check
            </Button>
            <Button variant="secondary" onClick={() => setEditing(false)}>
              Cancel
            </Button>
          </div>
        </form>
      ) : (
        <div className="space-y-1">
          {ncr.effectivenessCheck ? <p className="whitespace-pre-line">{ncr.effectivenessCheck}</p> : <p className="text-zinc-600">No effectiveness check recorded yet.</p>}
          <p>
            <span className="text-zinc-600">Verdict: </span>
            <span className="font-medium" data-testid="ncr-effective">
              {verdict(ncr.effective)}
            </span>
          </p>
          {ncr.closedAt && (
            <p>
              Closed <PlantTime at={ncr.closedAt} className="figures" />
              {ncr.closedBy && ` by ${ncr.closedBy}`}
            </p>
          )}
        </div>
      )}
    </Section>
  );
}
