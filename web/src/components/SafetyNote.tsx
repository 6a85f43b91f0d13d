/** Shown on every screen: Prismline supports decisions of trained staff and replaces no safety rule. */
export function SafetyNote({ className }: { className?: string }) {
  return (
    <p className={className ?? 'text-sm text-zinc-500'}>
      Decision support for trained laboratory staff; follow the product's safety data sheet, the test standards and local
      regulations.
    </p>
  );
}
