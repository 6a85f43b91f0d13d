import { lotStatusWords, type LotStatus } from '@shared/schemas/lots';
import { Badge } from './ui/Badge';

const tone = { released: 'positive', 'on-hold': 'warning', rejected: 'negative' } as const;

/** A lot's standing for dispatch, in words (the tone only supports them). */
export function LotStatusBadge({ status }: { status: LotStatus }) {
  return <Badge tone={tone[status]}>{lotStatusWords[status]}</Badge>;
}
