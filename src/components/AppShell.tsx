// The frame of every screen: skip link, header with navigation and user menu, main landmark,
// and the standing caution footer.
import { useEffect, useRef, useState } from 'react';
import { Link, Outlet, useLocation, useNavigate } from 'react-router';
import { ROLE_LABELS } from '../../shared/roles';
import { useSignOut } from '../api/session';
import { useAuth } from '../auth/AuthProvider';
import { Brand } from './Brand';
import { CautionFooter } from './CautionFooter';
import { MainNav } from './MainNav';
import { Button } from './ui';

export function AppShell() {
  const { user } = useAuth();
  const location = useLocation();
  const mainRef = useRef<HTMLElement>(null);
  const lastPath = useRef(location.pathname);
  const [menuOpen, setMenuOpen] = useState(false);

  // After in-app navigation, move focus to the main landmark so keyboard and screen-reader
  // users start at the new page's content.
  useEffect(() => {
    if (lastPath.current === location.pathname) return;
    lastPath.current = location.pathname;
    setMenuOpen(false);
    if (!location.hash) mainRef.current?.focus({ preventScroll: false });
  }, [location.pathname, location.hash]);

  return (
    <div className="flex min-h-screen flex-col">
      <a
        href="#main"
        className="sr-only rounded-md bg-accent-700 px-4 py-2 text-white focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:z-50"
      >
        Skip to content
      </a>
      <header className="border-b border-rule bg-white">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3 sm:px-6">
          <Brand />
          {user && (
            <>
              <button
                type="button"
                className="ml-auto rounded-md border border-rule px-3 py-1.5 text-sm md:hidden"
                aria-expanded={menuOpen}
                aria-controls="main-menu"
                onClick={() => setMenuOpen((o) => !o)}
              >
                {menuOpen ? 'Close menu' : 'Menu'}
              </button>
              <div
                id="main-menu"
                className={`${menuOpen ? 'flex' : 'hidden'} w-full flex-col gap-3 pb-2 md:flex md:w-auto md:flex-1 md:flex-row md:items-center md:pb-0`}
              >
                <MainNav onNavigate={() => setMenuOpen(false)} />
                <UserMenu />
              </div>
            </>
          )}
        </div>
      </header>
      <main id="main" ref={mainRef} tabIndex={-1} className="mx-auto w-full max-w-6xl flex-1 px-4 py-8 outline-none sm:px-6 sm:py-10">
        <Outlet />
      </main>
      <CautionFooter />
    </div>
  );
}

function UserMenu() {
  const { user } = useAuth();
  const signOut = useSignOut();
  const navigate = useNavigate();
  if (!user) return null;
  return (
    <div className="flex items-center gap-3 border-t border-rule pt-3 md:ml-auto md:border-0 md:pt-0">
      <div className="text-sm leading-tight md:text-right" data-testid="current-user">
        <Link to="/account" className="font-medium text-ink no-underline hover:underline">
          {user.name}
        </Link>
        <div className="text-ink-soft">{ROLE_LABELS[user.role]}</div>
      </div>
      <Button
        variant="secondary"
        busy={signOut.isPending}
        onClick={async () => {
          // mutateAsync rather than per-call callbacks: this menu unmounts as soon as the session is gone.
          try {
            await signOut.mutateAsync();
          } catch {
            // The session is forgotten locally either way (see useSignOut).
          } finally {
            void navigate('/sign-in', { replace: true });
          }
        }}
      >
        Sign out
      </Button>
    </div>
  );
}
