import { Link, useLocation } from 'react-router-dom';

export function NotFoundPage() {
  const { pathname } = useLocation();
  return (
    <div className="max-w-2xl">
      <h1 className="text-2xl font-semibold tracking-tight">Page not found</h1>
      <p className="mt-2 text-zinc-700">
        There is no page at <code className="rounded bg-zinc-100 px-1.5 py-0.5 font-mono text-sm">{pathname}</code>. The
        address may be mistyped, or the page may have moved.
      </p>
      <Link to="/" className="mt-4 inline-block font-medium text-accent-700 underline underline-offset-2 hover:text-accent-800">
        Go to the plant overview
      </Link>
    </div>
  );
}
