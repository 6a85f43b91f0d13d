/** A one-line outcome of an action, shown above a table. */
export interface Notice {
  tone: 'success' | 'error';
  text: string;
}
