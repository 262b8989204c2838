import type { ReactNode } from 'react';
import { Link, NavLink, Outlet, useNavigate } from 'react-router';
import { canSite } from '@contracts/roles';
import { useMe } from '../features/auth/me';
import { useSignOut } from '../features/auth/signOut';
import { useHealth } from '../features/status/health';
import { EstimateNote } from './EstimateNote';
import { Wordmark } from './Wordmark';

const navClass = ({ isActive }: { isActive: boolean }) =>
  `rounded-md px-3 py-1.5 text-note font-semibold transition-colors focus-visible:outline-2 focus-visible:outline-phosphor-400 ${
    isActive ? 'bg-wafer-700 text-white' : 'text-wafer-200 hover:bg-wafer-800 hover:text-white'
  }`;

function HealthBadge() {
  const health = useHealth();
  const up = health.data?.ok === true && health.data.database === 'up';
  const label = health.isPending ? 'checking server…' : up ? 'server and database reachable' : 'database unreachable';
  return (
    <span role="status" className="inline-flex shrink-0 items-center gap-1.5 whitespace-nowrap text-fine text-wafer-400">
      <span aria-hidden="true" className={`h-2 w-2 rounded-full ${health.isPending ? 'bg-wafer-500' : up ? 'bg-phosphor-400' : 'bg-ember-400'}`} />
      {label}
    </span>
  );
}

export function Footer() {
  return (
    <footer className="mt-auto border-t border-wafer-800 bg-wafer-950">
      <div className="mx-auto flex max-w-6xl flex-col gap-2 px-6 py-4 md:flex-row md:items-center md:justify-between">
        <EstimateNote variant="footer" />
        <HealthBadge />
      </div>
    </footer>
  );
}

/** Frame for signed-in screens: top bar with navigation, the page, and the footer note. */
export function AppShell() {
  const me = useMe();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const user = me.data;
  return (
    <div className="flex min-h-screen flex-col bg-wafer-50">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-3 focus:top-3 focus:z-10 focus:rounded-md focus:bg-white focus:px-3 focus:py-2 focus:text-wafer-900">
        Skip to content
      </a>
      <header className="bg-wafer-900">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-6 py-3">
          <Link to="/projects" className="rounded-md focus-visible:outline-2 focus-visible:outline-phosphor-400" aria-label="Tetrawell, your projects">
            <Wordmark />
          </Link>
          <nav aria-label="Main" className="flex flex-1 items-center gap-1">
            <NavLink to="/projects" className={navClass}>
              Projects
            </NavLink>
            <NavLink to="/account" className={navClass}>
              Account
            </NavLink>
            {canSite(user?.siteRole, 'admin.mail.read') && (
              <NavLink to="/admin/mail" className={navClass}>
                Mail room
              </NavLink>
            )}
          </nav>
          {user && (
            <div className="flex items-center gap-3">
              <span className="text-note text-wafer-300">
                <span className="sr-only">Signed in as </span>
                <span className="font-semibold text-wafer-100">{user.displayName}</span>
              </span>
              <button
                type="button"
                disabled={signOut.isPending}
                onClick={() => signOut.mutate(undefined, { onSettled: () => navigate('/sign-in', { replace: true }) })}
                className="rounded-md border border-wafer-600 px-3 py-1.5 text-note font-semibold text-wafer-100 hover:bg-wafer-800 disabled:opacity-60 focus-visible:outline-2 focus-visible:outline-phosphor-400"
              >
                {signOut.isPending ? 'Signing out…' : 'Sign out'}
              </button>
            </div>
          )}
        </div>
      </header>
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-6xl flex-1 px-6 py-8 focus:outline-none">
        <Outlet />
      </main>
      <Footer />
    </div>
  );
}

/** Frame for signed-out screens (sign-in, sign-up, reset): a centred card on the slate ground. */
export function GateShell({ title, lead, children }: { title: string; lead?: string; children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col bg-wafer-900">
      <main id="main" className="flex flex-1 items-center justify-center px-4 py-12">
        <div className="w-full max-w-md">
          <div className="mb-6 flex justify-center">
            <Wordmark />
          </div>
          <div className="rounded-xl bg-white px-7 py-8 shadow-xl shadow-wafer-950/40">
            <h1 className="text-title font-bold text-wafer-900">{title}</h1>
            {lead && <p className="mt-1 text-note text-wafer-500">{lead}</p>}
            <div className="mt-6">{children}</div>
          </div>
          <p className="mt-5 text-center text-fine text-wafer-400">Coulomb energies for donor and acceptor arrays in silicon, from finite elements on tetrahedral meshes.</p>
        </div>
      </main>
      <Footer />
    </div>
  );
}
