/** Joins class names, skipping the falsy ones from conditions. */
export function cx(...classes: (string | false | null | undefined)[]): string {
  return classes.filter(Boolean).join(' ');
}
