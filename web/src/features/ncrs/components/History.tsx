import type { NcrView } from '@shared/schemas/ncrs';
import { Section } from './Section';
import { PlantTime } from '@web/components/PlantTime';
import { PlainTable } from '@web/components/ui/Table';

/** Every step of the NCR and its parts, oldest first, from the audit trail. */
export function History({ ncr }: { ncr: NcrView }) {
  return (
    <Section id="history" title="History">
      {ncr.history.length === 0 ? (
        <p className="text-zinc-600">Nothing recorded yet.</p>
      ) : (
        <PlainTable caption="History of the NCR, oldest first" headings={['When', 'Who', 'What']}>
          {ncr.history.map((h, i) => (
            <tr key={`${h.at}-${i}`} className="border-b border-zinc-100 align-top last:border-b-0" data-history={h.action}>
              <td className="figures px-3 py-2 whitespace-nowrap">
                <PlantTime at={h.at} />
              </td>
              <td className="px-3 py-2">{h.actor ?? 'Prismline'}</td>
              <td className="px-3 py-2">
                {h.summary}
                {h.reason && <span className="block text-sm text-zinc-600">Reason: {h.reason}</span>}
              </td>
            </tr>
          ))}
        </PlainTable>
      )}
    </Section>
  );
}
