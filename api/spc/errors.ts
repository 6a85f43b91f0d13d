/**
 * A refusal of the SPC domain, in plain words for the person who asked. Domain code never speaks HTTP:
 * the API's error handler maps the kind to a status (api/http/errors.ts), for every route.
 * - not-found: the characteristic, point or exclusion named does not exist;
 * - conflict: the request clashes with the current state (a point already excluded);
 * - invalid: the request itself is incomplete or contradictory (no reason, a baseline that ends before it starts);
 * - not-possible: well formed, but the data do not allow it (no kept points, no variation to freeze limits from).
 */
export class DomainError extends Error {
  constructor(
    readonly kind: 'not-found' | 'conflict' | 'invalid' | 'not-possible',
    message: string,
  ) {
    super(message);
    this.name = 'DomainError';
  }
}
