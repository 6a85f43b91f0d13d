import { useState } from 'react';
import type { NcrView } from '@shared/schemas/ncrs';
import { useUpdateNcr } from '../api/ncrs';
import { Section, WriteError } from './Section';
import { PlantTime } from '@web/components/PlantTime';
import { Button } from '@web/components/ui/Button';
import { TextArea } from '@web/components/ui/TextArea';

/** A quality manager's approval of the root cause, the actions and the dispositions, with a note. */
export function Approval({ ncr, mayManage }: { ncr: NcrView; mayManage: boolean }) {
  const update = useUpdateNcr(ncr.id);
  const [note, setNote] = useState('');
  return (
    <Section id="approval" title="Approval">
      {ncr.approvedAt ? (
        <div>
          <p>
            Approved by <span className="font-medium">{ncr.approvedBy ?? 'a quality manager'}</span>, <PlantTime at={ncr.approvedAt} className="figures" />
          </p>
          {ncr.approvalNote && <p className="mt-1 whitespace-pre-line">{ncr.approvalNote}</p>}
        </div>
      ) : (
        <p className="text-zinc-600">Not approved yet.</p>
      )}
      {mayManage && !ncr.approvedAt && ncr.status !== 'closed' && (
        <form
          className="mt-3 space-y-2 print:hidden"
          aria-label="Approve"
          onSubmit={(e) => {
            e.preventDefault();
            update.mutate({ approve: { note } });
          }}
        >
          <label htmlFor="ncr-approval-note" className="block text-sm font-medium text-zinc-800">
            Approval note
          </label>
          <TextArea id="ncr-approval-note" rows={2} required minLength={3} maxLength={2000} value={note} onChange={(e) => setNote(e.target.value)} />
          <p className="text-sm text-zinc-600">What was reviewed: the root cause, the actions and the decisions on the lots.</p>
          {update.isError && <WriteError error={update.error} />}
          <Button type="submit" busy={update.isPending}>
            Approve
          </Button>
        </form>
      )}
    </Section>
  );
}
