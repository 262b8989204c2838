/**
 * Tetrawell's frame. A slim light header (the mark, the trail of where you are, the account),
 * the page on a plain paper ground, and one quiet line of footer with the model caveat and the
 * server's state. No rail and no cards around the page: the room goes to the content, and on the
 * design workspace to the canvas.
 *
 *   ┌─────────────────────────────────────────────────────────────────────────────┐
 *   │ ◮ Tetrawell │ Projects › Quad dot › Chain 6×          Mail room  Account  ⏻ │  header (banner)
 *   ├─────────────────────────────────────────────────────────────────────────────┤
 *   │  page (max 72rem, padded)  ·  or, on a `fullBleed` route, edge to edge       │  main
 *   ├─────────────────────────────────────────────────────────────────────────────┤
 *   │ Model estimates …                                            ● server up    │  footer (contentinfo)
 *   └─────────────────────────────────────────────────────────────────────────────┘
 *
 * A route opts into the edge-to-edge main area with `handle: { fullBleed: true }`; its page then
 * fills the height between header and footer (main is a flex column, give the page `flex-1`).
 */
import { useState, type ReactNode } from 'react';
import { Link, NavLink, Outlet, useMatches, useNavigate } from 'react-router';
import { canSite } from '@contracts/roles';
import { useMe } from '../features/auth/me';
import { useSignOut } from '../features/auth/signOut';
import { useHealth } from '../features/status/health';
import { EstimateNote } from './EstimateNote';
import { TrailContext, usePageTitle, type Crumb } from './pageTitle';
import { Wordmark } from './Wordmark';

const linkClass = ({ isActive }: { isActive: boolean }) =>
  `relative rounded px-1 py-0.5 text-note font-semibold transition-colors ${
    isActive ? 'text-wafer-900 after:absolute after:inset-x-1 after:-bottom-[0.6rem] after:h-0.5 after:bg-phosphor-600' : 'text-wafer-600 hover:text-wafer-900'
  }`;

function HealthBadge() {
  const health = useHealth();
  const up = health.data?.ok === true && health.data.database === 'up';
  const label = health.isPending ? 'checking server…' : up ? 'server and database reachable' : 'database unreachable';
  return (
    <span role="status" className="inline-flex shrink-0 items-center gap-1.5 whitespace-nowrap text-fine text-wafer-600">
      <span aria-hidden="true" className={`h-2 w-2 rounded-full ${health.isPending ? 'bg-wafer-300' : up ? 'bg-phosphor-500' : 'bg-garnet-600'}`} />
      {label}
    </span>
  );
}

export function Footer({ wide = false }: { wide?: boolean }) {
  return (
    <footer className="border-t border-wafer-200 bg-paper">
      <div className={`mx-auto flex flex-col gap-1.5 px-5 py-2.5 md:flex-row md:items-center md:justify-between md:gap-6 ${wide ? '' : 'max-w-6xl'}`}>
        <EstimateNote variant="footer" />
        <HealthBadge />
      </div>
    </footer>
  );
}

/** Where you are: the trail the page gave with `usePageTitle`, the last step being the page itself. */
function Trail({ trail }: { trail: Crumb[] }) {
  if (trail.length === 0) return null;
  return (
    <nav aria-label="Breadcrumb" className="min-w-0 flex-1">
      <ol className="flex min-w-0 items-center gap-1.5 text-note">
        {trail.map((c, i) => {
          const last = i === trail.length - 1;
          return (
            <li key={i} className={`flex items-center gap-1.5 ${last ? 'min-w-0' : 'max-w-[16rem] shrink-0'}`}>
              {i > 0 && (
                <svg aria-hidden="true" viewBox="0 0 8 12" className="h-2.5 w-2 shrink-0 text-wafer-300">
                  <path d="M1.5 1 L6.5 6 L1.5 11" fill="none" stroke="currentColor" strokeWidth="1.6" />
                </svg>
              )}
              {c.to && !last ? (
                <Link to={c.to} title={c.label} className="truncate rounded font-semibold text-wafer-600 underline-offset-2 hover:text-phosphor-700 hover:underline">
                  {c.label}
                </Link>
              ) : (
                <span aria-current={last ? 'page' : undefined} title={c.label} className="truncate font-semibold text-wafer-900">
                  {c.label}
                </span>
              )}
            </li>
          );
        })}
      </ol>
    </nav>
  );
}

function SkipLink() {
  return (
    <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-3 focus:top-2 focus:z-20 focus:rounded focus:bg-white focus:px-3 focus:py-2 focus:text-wafer-900 focus:shadow">
      Skip to content
    </a>
  );
}

function Brand({ signedIn }: { signedIn: boolean }) {
  return (
    <Link to={signedIn ? '/projects' : '/sign-in'} className="shrink-0 rounded" aria-label={signedIn ? 'Tetrawell, your projects' : 'Tetrawell, sign in'}>
      <Wordmark size="small" />
    </Link>
  );
}

function AccountLinks() {
  const me = useMe();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const user = me.data;
  if (me.isPending) return null;
  if (!user) {
    return (
      <nav aria-label="Account" className="flex shrink-0 items-center gap-4">
        <NavLink to="/sign-in" className={linkClass}>
          Sign in
        </NavLink>
        <NavLink to="/sign-up" className={linkClass}>
          Create an account
        </NavLink>
      </nav>
    );
  }
  return (
    <div className="flex shrink-0 items-center gap-4">
      <nav aria-label="Main" className="flex items-center gap-3">
        <NavLink to="/projects" className={linkClass}>
          Projects
        </NavLink>
        {canSite(user.siteRole, 'admin.mail.read') && (
          <NavLink to="/admin/mail" className={linkClass}>
            Mail room
          </NavLink>
        )}
        <NavLink to="/account" className={linkClass}>
          Account
        </NavLink>
      </nav>
      <span aria-hidden="true" className="h-5 w-px bg-wafer-200" />
      <span className="hidden max-w-[14rem] truncate text-note text-wafer-600 sm:inline" title={user.displayName}>
        <span className="sr-only">Signed in as </span>
        <span className="font-semibold text-wafer-800">{user.displayName}</span>
      </span>
      <button
        type="button"
        disabled={signOut.isPending}
        onClick={() => signOut.mutate(undefined, { onSettled: () => navigate('/sign-in', { replace: true }) })}
        className="rounded px-1 py-0.5 text-note font-semibold text-wafer-600 hover:text-garnet-700 disabled:opacity-60"
      >
        {signOut.isPending ? 'Signing out…' : 'Sign out'}
      </button>
    </div>
  );
}

/**
 * The frame around every page reached from the app (and the not-found page, for signed-in and
 * signed-out visitors alike). Pages name themselves and their trail with `usePageTitle`.
 */
export function AppShell({ children }: { children?: ReactNode }) {
  const [trail, setTrail] = useState<Crumb[]>([]);
  const me = useMe();
  const fullBleed = useMatches().some((m) => (m.handle as { fullBleed?: boolean } | undefined)?.fullBleed === true);
  return (
    <TrailContext.Provider value={setTrail}>
      <div className={`flex flex-col bg-paper ${fullBleed ? 'h-dvh' : 'min-h-dvh'}`}>
        <SkipLink />
        <header className="sticky top-0 z-10 border-b border-wafer-200 bg-paper/95 backdrop-blur-sm">
          <div className={`mx-auto flex h-12 items-center gap-4 px-5 ${fullBleed ? '' : 'max-w-6xl'}`}>
            <Brand signedIn={!!me.data} />
            <span aria-hidden="true" className="h-5 w-px shrink-0 bg-wafer-200" />
            <Trail trail={trail} />
            {trail.length === 0 && <span className="flex-1" />}
            <AccountLinks />
          </div>
        </header>
        <main
          id="main"
          tabIndex={-1}
          className={fullBleed ? 'flex min-h-0 w-full flex-1 flex-col focus:outline-none' : 'mx-auto w-full max-w-6xl flex-1 px-5 pb-12 pt-7 focus:outline-none'}
        >
          {children ?? <Outlet />}
        </main>
        <Footer wide={fullBleed} />
      </div>
    </TrailContext.Provider>
  );
}

/** Frame for signed-out screens (sign-in, sign-up, reset): the same slim header, one narrow column. */
export function GateShell({ title, lead, children }: { title: string; lead?: string; children: ReactNode }) {
  usePageTitle(title);
  return (
    <div className="flex min-h-dvh flex-col bg-paper">
      <SkipLink />
      <header className="border-b border-wafer-200">
        <div className="mx-auto flex h-12 max-w-6xl items-center px-5">
          <Link to="/sign-in" className="rounded" aria-label="Tetrawell, sign in">
            <Wordmark size="small" />
          </Link>
        </div>
      </header>
      <main id="main" tabIndex={-1} className="flex flex-1 justify-center px-4 pb-12 pt-14 focus:outline-none md:pt-20">
        <div className="w-full max-w-md">
          <h1 className="wrap-anywhere text-title font-bold tracking-tight text-wafer-900">{title}</h1>
          {lead && <p className="mt-1 wrap-anywhere text-body text-wafer-600">{lead}</p>}
          <div className="mt-6 border-t-2 border-wafer-900 pt-6">{children}</div>
          <p className="mt-10 text-fine text-wafer-500">Coulomb energies for donor and acceptor arrays in silicon, from finite elements on tetrahedral meshes.</p>
        </div>
      </main>
      <Footer />
    </div>
  );
}
