import { useEffect, useId, useState, type ReactNode } from 'react';
import { Link, NavLink, Outlet, useLocation } from 'react-router-dom';
import { Caution } from '@client/components/Caution';
import { SkipLink } from '@client/components/SkipLink';
import { useCurrentSite } from '@client/lib/currentSite';
import { useMe } from '@client/lib/session';
import { navItems, visibleNavLinks } from './nav';
import { PersonLinks, PersonMenu } from './PersonMenu';
import { SiteSwitcher } from './SiteSwitcher';

const navLinkClass = ({ isActive }: { isActive: boolean }) =>
  `flex min-h-11 items-center rounded-md px-3 font-semibold no-underline ${
    isActive ? 'bg-accent-wash text-accent-strong underline underline-offset-4' : 'text-ink hover:bg-accent-wash'
  }`;

function Brand() {
  return (
    <Link to="/" className="flex min-h-11 items-center text-2xl font-bold tracking-tight text-ink no-underline">
      Brink
    </Link>
  );
}

function Footer() {
  return (
    <footer className="mt-12 border-t border-rule">
      <div className="mx-auto max-w-6xl px-4 py-6">
        <Caution />
      </div>
    </footer>
  );
}

/** The frame of every signed-in page: name, site switcher, navigation, the person's menu, the caution. */
export function Layout() {
  const me = useMe().data;
  const { siteId } = useCurrentSite();
  const [menuOpen, setMenuOpen] = useState(false);
  const menuId = useId();
  const { pathname } = useLocation();
  useEffect(() => setMenuOpen(false), [pathname]);
  if (!me) return null;
  const links = visibleNavLinks(navItems, me, siteId);

  const navList = (
    <ul className="flex flex-col gap-1 md:flex-row md:flex-wrap md:items-center">
      {links.map((l) => (
        <li key={l.to}>
          <NavLink to={l.to} end={l.end} className={navLinkClass}>
            {l.label}
          </NavLink>
        </li>
      ))}
    </ul>
  );

  return (
    <Frame
      header={
        <header className="border-b border-rule bg-sheet">
          <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
            <Brand />
            <nav aria-label="Main" className="hidden md:block">
              {navList}
            </nav>
            <div className="ml-auto hidden items-center gap-4 md:flex">
              <SiteSwitcher />
              <PersonMenu />
            </div>
            <button
              type="button"
              className="ml-auto inline-flex min-h-11 items-center gap-2 rounded-md border border-rule-strong px-4 font-semibold md:hidden"
              aria-expanded={menuOpen}
              aria-controls={menuId}
              onClick={() => setMenuOpen((o) => !o)}
            >
              Menu <span aria-hidden="true">{menuOpen ? '▴' : '▾'}</span>
            </button>
            <SiteSwitcher className="basis-full md:hidden" />
          </div>
          <div id={menuId} hidden={!menuOpen} className="border-t border-rule px-4 py-4 md:hidden">
            <nav aria-label="Main, on small screens" className="mb-4">
              {navList}
            </nav>
            <PersonLinks onDone={() => setMenuOpen(false)} />
          </div>
        </header>
      }
    />
  );
}

/** The frame of the pages for people not signed in. */
export function PublicLayout() {
  return (
    <Frame
      header={
        <header className="mx-auto w-full max-w-6xl px-4 pt-6">
          <Brand />
          <p className="text-ink-soft">Loads beside open excavations, under control.</p>
        </header>
      }
    />
  );
}

/** Skip link, the given header, the page, and the footer with the caution. */
function Frame({ header }: { header: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col">
      <SkipLink />
      {header}
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-6xl flex-1 px-4 py-8 focus:outline-none">
        <Outlet />
      </main>
      <Footer />
    </div>
  );
}
