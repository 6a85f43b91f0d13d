import { Suspense, useState } from 'react';
import { NavLink, Outlet, useNavigate } from 'react-router-dom';
import { useSignOut, useSignedInUser } from '@web/lib/session';
import { areasFor, type Area } from '../navigation';
import { roleLabels } from '@shared/schemas/roles';
import { Button } from '@web/components/ui/Button';
import { Loading } from '@web/components/ui/Spinner';
import { cx } from '@web/components/ui/cx';
import { SafetyNote } from '@web/components/SafetyNote';
import { plantTimeNote } from '@shared/time';
import { usePlantClock } from '@web/lib/catalogue';
import { LotSearch } from './LotSearch';

export function AppLayout() {
  const user = useSignedInUser();
  const navigate = useNavigate();
  const signOut = useSignOut();
  const [menuOpen, setMenuOpen] = useState(false);
  const menu = areasFor(user.role);

  const handleSignOut = () =>
    signOut.mutate(undefined, {
      // A fresh sign-in page: the next person to sign in starts at their own overview.
      onSettled: () => navigate('/sign-in', { replace: true, state: {} }),
    });

  return (
    <div className="min-h-dvh lg:grid lg:grid-cols-[16rem_minmax(0,1fr)]">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-4 focus:top-4 focus:z-50 focus:rounded focus:bg-white focus:px-3 focus:py-2">
        Skip to content
      </a>

      <aside className="hidden border-r border-zinc-200 bg-white lg:block">
        <div className="sticky top-0 flex max-h-dvh flex-col overflow-y-auto">
          <Brand className="px-5 pt-5 pb-6" />
          <Menu areas={menu} className="px-3 pb-6" />
        </div>
      </aside>

      <div className="flex min-h-dvh flex-col">
        <header className="sticky top-0 z-20 border-b border-zinc-200 bg-white/95 backdrop-blur">
          <div className="flex h-16 items-center gap-3 px-4 sm:px-6">
            <Button
              variant="secondary"
              className="lg:hidden"
              aria-expanded={menuOpen}
              aria-controls="narrow-menu"
              onClick={() => setMenuOpen((open) => !open)}
            >
              {menuOpen ? 'Close menu' : 'Menu'}
            </Button>
            <Brand className="lg:hidden" compact />
            <LotSearch className="ml-auto w-full max-w-64 min-w-0 flex-1 sm:ml-4" />
            <div className="ml-auto flex shrink-0 items-center gap-4">
              <div className="hidden text-right leading-tight sm:block">
                <p className="font-medium text-zinc-900">
                  {user.name}
                </p>
                <p className="text-sm text-zinc-600" data-testid="user-role">
                  {roleLabels[user.role]}
                </p>
              </div>
              <Button variant="secondary" onClick={handleSignOut} busy={signOut.isPending}>
                Sign out
              </Button>
            </div>
          </div>
          {menuOpen && (
            <div id="narrow-menu" className="border-t border-zinc-200 bg-white px-3 py-3 lg:hidden">
              <p className="px-3 pb-3 text-sm text-zinc-600 sm:hidden">
                Signed in as <span className="font-medium text-zinc-900">{user.name}</span>, {roleLabels[user.role]}
              </p>
              <Menu areas={menu} onNavigate={() => setMenuOpen(false)} />
            </div>
          )}
        </header>

        <main id="main" className="flex-1 px-4 py-6 sm:px-6 lg:px-8 lg:py-8">
          <Suspense fallback={<Loading />}>
            <Outlet />
          </Suspense>
        </main>

        <footer className="space-y-1 border-t border-zinc-200 px-4 py-4 sm:px-6 lg:px-8">
          <PlantClockNote />
          <SafetyNote />
        </footer>
      </div>
    </div>
  );
}

/** Names the plant's zone once for the whole page: every time shown and typed on it is plant time. */
function PlantClockNote() {
  const clock = usePlantClock().data;
  if (!clock) return null;
  return (
    <p className="text-sm text-zinc-600" data-testid="plant-time-note">
      {plantTimeNote(clock.timeZone)}. Dates are written {clock.dateFormat.toLowerCase()}.
    </p>
  );
}

function Brand({ className, compact = false }: { className?: string; compact?: boolean }) {
  return (
    <div className={className}>
      <p className="text-xl font-semibold tracking-tight text-accent-800">Prismline</p>
      {!compact && <p className="text-sm text-zinc-500">QC laboratory</p>}
    </div>
  );
}

function Menu({ areas, className, onNavigate }: { areas: Area[]; className?: string; onNavigate?: () => void }) {
  const work = areas.filter((area) => area.group === 'work');
  const administration = areas.filter((area) => area.group === 'administration');
  return (
    <nav aria-label="Main menu" className={className}>
      <MenuList areas={work} onNavigate={onNavigate} />
      {administration.length > 0 && (
        <>
          <p className="mt-6 mb-1 px-3 text-xs font-semibold tracking-wider text-zinc-500 uppercase">Administration</p>
          <MenuList areas={administration} onNavigate={onNavigate} />
        </>
      )}
    </nav>
  );
}

function MenuList({ areas, onNavigate }: { areas: Area[]; onNavigate?: () => void }) {
  return (
    <ul className="space-y-0.5">
      {areas.map((area) => (
        <li key={area.id}>
          <NavLink
            to={area.path}
            end={area.path === '/'}
            onClick={onNavigate}
            className={({ isActive }) =>
              cx(
                'block rounded-md border-l-4 px-3 py-2 text-base transition-colors',
                isActive
                  ? 'border-accent-600 bg-accent-50 font-medium text-accent-800'
                  : 'border-transparent text-zinc-700 hover:bg-zinc-100 hover:text-zinc-900',
              )
            }
          >
            {area.label}
          </NavLink>
        </li>
      ))}
    </ul>
  );
}
