import { useRef, useState } from 'react';
import type { NcrView } from '@shared/schemas/ncrs';
import { useAttachToNcr } from '../api/ncrs';
import { formatFileSize } from '../lib/file-size';
import { Section, WriteError } from './Section';
import { PlantTime } from '@web/components/PlantTime';
import { PlainTable } from '@web/components/ui/Table';
import { Button } from '@web/components/ui/Button';
import { Input } from '@web/components/ui/Field';

/** Photos, test reports and certificates kept with the NCR; each with its SHA-256 so a copy can be checked against it. */
export function Attachments({ ncr, mayAttach }: { ncr: NcrView; mayAttach: boolean }) {
  return (
    <Section id="attachments" title="Attachments">
      {ncr.attachments.length === 0 ? (
        <p className="text-zinc-600">No file attached.</p>
      ) : (
        <PlainTable caption="Attachments" headings={['File', 'Size', 'Type', 'SHA-256', 'Added']}>
          {ncr.attachments.map((a) => (
            <tr key={a.id} className="border-b border-zinc-100 align-top last:border-b-0" data-attachment={a.fileName}>
              <td className="px-3 py-2">
                <a className="text-accent-800 underline [overflow-wrap:anywhere]" href={a.url} download={a.fileName}>
                  {a.fileName}
                </a>
                {a.note && <span className="block text-sm text-zinc-600">{a.note}</span>}
              </td>
              <td className="figures px-3 py-2 text-right whitespace-nowrap">{formatFileSize(a.sizeBytes)}</td>
              <td className="px-3 py-2 font-mono text-sm">{a.contentType}</td>
              <td className="px-3 py-2 font-mono text-xs break-all">{a.sha256}</td>
              <td className="figures px-3 py-2 text-sm whitespace-nowrap">
                <PlantTime at={a.createdAt} />
                {a.createdBy && <span className="block text-zinc-600">{a.createdBy}</span>}
              </td>
            </tr>
          ))}
        </PlainTable>
      )}
      {mayAttach && <Upload ncr={ncr} />}
    </Section>
  );
}

function Upload({ ncr }: { ncr: NcrView }) {
  const attach = useAttachToNcr(ncr.id);
  const input = useRef<HTMLInputElement>(null);
  const [file, setFile] = useState<File | null>(null);
  const [note, setNote] = useState('');
  return (
    <form
      className="mt-4 flex flex-wrap items-end gap-3 print:hidden"
      aria-label="Attach a file"
      onSubmit={(e) => {
        e.preventDefault();
        if (!file) return;
        attach.mutate(
          { file, note: note.trim() || undefined },
          {
            onSuccess: () => {
              setFile(null);
              setNote('');
              if (input.current) input.current.value = '';
            },
          },
        );
      }}
    >
      <div className="space-y-1">
        <label htmlFor="ncr-file" className="block text-sm font-medium text-zinc-800">
          File
        </label>
        <input
          ref={input}
          id="ncr-file"
          type="file"
          required
          className="block text-sm file:mr-3 file:rounded-md file:border file:border-zinc-300 file:bg-white file:px-3 file:py-1.5 file:font-medium"
          onChange={(e) => {
            attach.reset();
            setFile(e.target.files?.[0] ?? null);
          }}
        />
      </div>
      <div className="space-y-1">
        <label htmlFor="ncr-file-note" className="block text-sm font-medium text-zinc-800">
          Note (optional)
        </label>
        <Input id="ncr-file-note" className="w-72" maxLength={1000} value={note} onChange={(e) => setNote(e.target.value)} />
      </div>
      <Button type="submit" variant="secondary" busy={attach.isPending} disabled={!file}>
        Attach
      </Button>
      {attach.isError && (
        <div className="basis-full">
          <WriteError error={attach.error} />
        </div>
      )}
    </form>
  );
}
