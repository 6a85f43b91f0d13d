import { ncrStatusWords, type NcrSeverity, type NcrStatus } from '@shared/schemas/ncrs';
import { Badge } from '@web/components/ui/Badge';
import { severityWords } from '../lib/words';

const statusTone = { open: 'warning', investigating: 'accent', 'actions-pending': 'accent', closed: 'neutral' } as const;
const severityTone = { minor: 'neutral', major: 'warning', critical: 'negative' } as const;

/** The NCR's state in words; the tone only supports them. */
export function NcrStatusBadge({ status }: { status: NcrStatus }) {
  return <Badge tone={statusTone[status]}>{ncrStatusWords[status]}</Badge>;
}

export function SeverityBadge({ severity }: { severity: NcrSeverity }) {
  return <Badge tone={severityTone[severity]}>{severityWords[severity]}</Badge>;
}
