import type { NcrSeverity, NcrActionKind } from '@shared/schemas/ncrs';

export const severityWords: Record<NcrSeverity, string> = { minor: 'Minor', major: 'Major', critical: 'Critical' };

/** What each severity means at the plant, for the pick list (common practice in quality work). */
export const severityHints: Record<NcrSeverity, string> = {
  minor: 'a slip in a record or procedure; no product out of specification reached a customer',
  major: 'product out of specification, contained at the plant',
  critical: 'product out of specification may have reached customers or site, or someone may be put at risk',
};

export const actionKindWords: Record<NcrActionKind, string> = { corrective: 'Corrective', preventive: 'Preventive' };
