import { Link } from 'react-router-dom';
import type { NcrView } from '@shared/schemas/ncrs';
import { Section } from './Section';

/** The alarms the NCR was raised from or linked to later, each with its chart point and its place in the alarm list. */
export function LinkedAlarms({ ncr }: { ncr: NcrView }) {
  if (ncr.alarms.length === 0) return null;
  return (
    <Section id="alarms" title="Linked alarms">
      <ul className="space-y-2">
        {ncr.alarms.map((a) => (
          <li key={a.id} className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1 border-t border-zinc-100 pt-2 first:border-t-0 first:pt-0" data-alarm={a.id}>
            <div className="min-w-0 basis-96">
              <p>
                <span className="font-medium">{a.signal}</span> · <span className="font-mono">{a.characteristicCode}</span> {a.characteristicName}, lot{' '}
                <span className="font-mono">{a.lotNumber}</span>
              </p>
              <p className="text-sm text-zinc-600">{a.description}</p>
            </div>
            <div className="flex gap-4 text-sm font-medium print:hidden">
              <a className="text-accent-800 underline" href={a.chartUrl}>
                Chart at this point
              </a>
              <Link className="text-accent-800 underline" to={`/alarms/${a.id}`}>
                Alarm {a.id}
              </Link>
            </div>
          </li>
        ))}
      </ul>
    </Section>
  );
}
