import { useId } from 'react';
import { cautionDeferral } from '@shared/lab';
import { cx } from '@web/components/ui/cx';

/**
 * The handling cautions of a test method as the API gives them ("Title: text", the deferral to the
 * safety data sheet last). The title leads each line so a glance finds gloves, dust or the press.
 */
export function MethodCautions({ cautions, title = 'Handling cautions', className }: { cautions: readonly string[]; title?: string; className?: string }) {
  const headingId = useId();
  const points = cautions.filter((text) => text !== cautionDeferral);
  const deferral = cautions.find((text) => text === cautionDeferral);
  return (
    <section aria-labelledby={headingId} className={cx('rounded-lg border border-amber-300 bg-amber-50 px-4 py-3 text-amber-950', className)}>
      <h3 id={headingId} className="font-semibold">
        {title}
      </h3>
      <ul className="mt-2 space-y-1.5 text-sm">
        {points.map((text) => {
          const split = text.indexOf(': ');
          return (
            <li key={text} className="pl-3 -indent-3">
              {split > 0 ? (
                <>
                  <span className="font-semibold">{text.slice(0, split)}:</span> {text.slice(split + 2)}
                </>
              ) : (
                text
              )}
            </li>
          );
        })}
      </ul>
      {deferral && <p className="mt-2 border-t border-amber-200 pt-2 text-sm font-medium">{deferral}</p>}
    </section>
  );
}
