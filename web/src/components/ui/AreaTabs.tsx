import { NavLink } from 'react-router-dom';
import { cx } from './cx';

export interface AreaTab {
  to: string;
  label: string;
}

/**
 * The page links of one area as a row of tabs. They are links, not ARIA tabs, because each one is a page
 * of its own with an address; NavLink marks the open one with aria-current="page".
 */
export function AreaTabs({ label, tabs }: { label: string; tabs: readonly AreaTab[] }) {
  return (
    <nav aria-label={label} className="mb-6 border-b border-zinc-200">
      <ul className="-mb-px flex flex-wrap gap-x-1">
        {tabs.map((tab) => (
          <li key={tab.to}>
            <NavLink
              to={tab.to}
              className={({ isActive }) =>
                cx(
                  'block border-b-2 px-3 py-2 font-medium focus-visible:outline-2 focus-visible:outline-accent-600',
                  isActive ? 'border-accent-600 text-accent-800' : 'border-transparent text-zinc-600 hover:border-zinc-300 hover:text-zinc-900',
                )
              }
            >
              {tab.label}
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}
