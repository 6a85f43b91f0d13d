import { useState } from 'react';
import { causeCategories, causeCategoryWords, type CauseCategory } from '@shared/schemas/causes';
import type { NcrView } from '@shared/schemas/ncrs';
import { useUpdateNcr } from '../api/ncrs';
import { Section, WriteError } from './Section';
import { Button } from '@web/components/ui/Button';
import { Select } from '@web/components/ui/Field';
import { TextArea } from '@web/components/ui/TextArea';

/** The cause found (one of the six categories, with what each covers at the plant) and the analysis behind it. */
export function RootCause({ ncr, mayManage }: { ncr: NcrView; mayManage: boolean }) {
  const [editing, setEditing] = useState(false);
  const editable = mayManage && ncr.status !== 'closed';
  return (
    <Section
      id="root-cause"
      title="Root cause"
      aside={
        editable &&
        !editing && (
          <Button size="sm" variant="secondary" className="print:hidden" onClick={() => setEditing(true)}>
            {ncr.rootCauseCategory || ncr.rootCauseAnalysis ? 'Change the root cause' : 'Record the root cause'}
          </Button>
        )
      }
    >
      {editing ? (
        <RootCauseForm ncr={ncr} onDone={() => setEditing(false)} />
      ) : ncr.rootCauseCategory || ncr.rootCauseAnalysis ? (
        <div className="space-y-2">
          {ncr.rootCauseCategory && (
            <p>
              <span className="font-medium">{causeCategoryWords[ncr.rootCauseCategory].label}</span>
              <span className="text-zinc-600"> — {causeCategoryWords[ncr.rootCauseCategory].hint}</span>
            </p>
          )}
          {ncr.rootCauseAnalysis && <p className="whitespace-pre-line">{ncr.rootCauseAnalysis}</p>}
        </div>
      ) : (
        <p className="text-zinc-600">Not found yet.</p>
      )}
    </Section>
  );
}

function RootCauseForm({ ncr, onDone }: { ncr: NcrView; onDone: () => void }) {
  const update = useUpdateNcr(ncr.id);
  const [category, setCategory] = useState<CauseCategory | ''>(ncr.rootCauseCategory ?? '');
  const [analysis, setAnalysis] = useState(ncr.rootCauseAnalysis ?? '');
  return (
    <form
      className="space-y-3"
      aria-label="Root cause"
      onSubmit={(e) => {
        e.preventDefault();
        update.mutate({ rootCauseCategory: category || null, rootCauseAnalysis: analysis.trim() || null }, { onSuccess: onDone });
      }}
    >
      <div className="space-y-1">
        <label htmlFor="ncr-cause" className="block text-sm font-medium text-zinc-800">
          Cause category
        </label>
        <Select id="ncr-cause" className="max-w-md" value={category} onChange={(e) => setCategory(e.target.value as CauseCategory | '')} aria-describedby="ncr-cause-hint">
          <option value="">Not decided</option>
          {causeCategories.map((c) => (
            <option key={c} value={c}>
              {causeCategoryWords[c].label} — {causeCategoryWords[c].hint}
            </option>
          ))}
        </Select>
        <p id="ncr-cause-hint" className="text-sm text-zinc-600">
          {category ? causeCategoryWords[category].hint : 'Choose where the cause lies.'}
        </p>
      </div>
      <div className="space-y-1">
        <label htmlFor="ncr-analysis" className="block text-sm font-medium text-zinc-800">
          Analysis
        </label>
        <TextArea id="ncr-analysis" rows={5} maxLength={5000} value={analysis} onChange={(e) => setAnalysis(e.target.value)} />
        <p className="text-sm text-zinc-600">How the cause was found: what was checked, what the evidence shows, why it explains the nonconformance.</p>
      </div>
      {update.isError && <WriteError error={update.error} />}
      <div className="flex gap-2">
        <Button type="submit" busy={update.isPending}>
          Save the root cause
        </Button>
        <Button variant="secondary" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
