import { Link } from 'react-router-dom';
import { useSignedInUser } from '@web/lib/session';
import { roleLabels } from '@shared/schemas/roles';

export function NotAllowedPage() {
  const user = useSignedInUser();
  return (
    <div className="max-w-2xl">
      <h1 className="text-2xl font-semibold tracking-tight">Not allowed for your role</h1>
      <p className="mt-2 text-zinc-700">
        You are signed in as <span className="font-medium">{roleLabels[user.role]}</span>, and this page is not part of that
        role. If your work needs it, ask an administrator to change your role.
      </p>
      <Link to="/" className="mt-4 inline-block font-medium text-accent-700 underline underline-offset-2 hover:text-accent-800">
        Go to the plant overview
      </Link>
    </div>
  );
}
