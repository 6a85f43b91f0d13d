import type { Characteristic } from './catalogue';

/** A characteristic's name without its product, where a list already groups or filters by product: "flow diameter". */
export function characteristicLabel(c: Pick<Characteristic, 'name' | 'productName'>): string {
  const prefix = `${c.productName} · `;
  return c.name.startsWith(prefix) ? c.name.slice(prefix.length) : c.name;
}
