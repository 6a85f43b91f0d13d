import { figure } from '@web/lib/chart-format';
import type { SpecRevision } from '@web/lib/specifications';
import { revisionState, type RevisionState } from '../lib/in-force';
import { PlantTime } from '@web/components/PlantTime';
import { Badge } from '@web/components/ui/Badge';

const stateTone: Record<RevisionState, 'positive' | 'accent' | 'neutral'> = { 'in force': 'positive', scheduled: 'accent', superseded: 'neutral' };
const stateLabel: Record<RevisionState, string> = { 'in force': 'In force', scheduled: 'Not yet in force', superseded: 'Superseded' };

const th = 'border-b border-zinc-200 px-3 py-2.5 font-semibold whitespace-nowrap';

/** Every revision of one characteristic's specification, newest first, with who made it and why. */
export function RevisionHistory({ revisions, inForce, unit, decimals }: { revisions: SpecRevision[]; inForce: number | null; unit: string; decimals: number }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
      <table className="w-full border-collapse text-left">
        <caption className="sr-only">Revision history</caption>
        <thead className="bg-zinc-100/80 text-sm text-zinc-700">
          <tr>
            <th scope="col" className={`${th} text-right`}>Revision</th>
            <th scope="col" className={th}>State</th>
            <th scope="col" className={`${th} text-right`}>LSL ({unit})</th>
            <th scope="col" className={`${th} text-right`}>Target ({unit})</th>
            <th scope="col" className={`${th} text-right`}>USL ({unit})</th>
            <th scope="col" className={th}>Effective from</th>
            <th scope="col" className={th}>Reason</th>
          </tr>
        </thead>
        <tbody>
          {revisions.map((r) => {
            const state = revisionState(r, inForce);
            return (
              <tr key={r.id} className="border-b border-zinc-100 align-top last:border-b-0">
                <th scope="row" className="px-3 py-2 text-right font-mono font-normal">{r.revision}</th>
                <td className="px-3 py-2">
                  <Badge tone={stateTone[state]}>{stateLabel[state]}</Badge>
                </td>
                <td className="px-3 py-2 text-right font-mono">{figure(r.lsl, decimals)}</td>
                <td className="px-3 py-2 text-right font-mono">{figure(r.target, decimals)}</td>
                <td className="px-3 py-2 text-right font-mono">{figure(r.usl, decimals)}</td>
                <td className="px-3 py-2 font-mono text-sm whitespace-nowrap"><PlantTime at={r.effectiveFrom} /></td>
                <td className="min-w-56 px-3 py-2 text-sm">
                  <span className="block text-zinc-900 [overflow-wrap:anywhere]">{r.reason ?? '—'}</span>
                  <span className="mt-0.5 block text-zinc-600">
                    {r.createdBy ?? 'Unknown user'}, <span className="font-mono whitespace-nowrap"><PlantTime at={r.createdAt} /></span>
                  </span>
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
