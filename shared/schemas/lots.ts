/** GET /api/v1/lots items: a lot as produced, newest first (a lot number typed in full first). */
export interface LotListItem {
  id: number;
  lotNumber: string;
  /** ISO 8601 instant. */
  producedAt: string;
  shift: string | null;
  productCode: string;
  lineCode: string;
}
