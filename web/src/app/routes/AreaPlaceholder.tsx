import type { Area } from '../navigation';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Badge } from '@web/components/ui/Badge';

/** Stands in for an area that is planned but not built, so the menu never leads to a blank page. */
export function AreaPlaceholder({ area }: { area: Area }) {
  return (
    <>
      <PageHeader title={area.label} description={area.purpose} />
      <div className="flex flex-wrap items-center gap-3 rounded-lg border border-dashed border-zinc-300 bg-white px-5 py-6">
        <Badge>Not available yet</Badge>
        <p className="text-zinc-600">This area is planned and will appear here in a later release.</p>
      </div>
    </>
  );
}
