'use client';
import Link from 'next/link';
import { usePathname } from 'next/navigation';
import { useState } from 'react';
import { signOut } from 'next-auth/react';
import { cn } from '@/lib/client/cn';

export type NavItem = { href: string; label: string; hint: string; adminOnly?: boolean };

export const mainNav: NavItem[] = [
  { href: '/', label: 'Overview', hint: 'Your team at a glance' },
  { href: '/arrays', label: 'Arrays', hint: 'Design and revisions' },
  { href: '/datasets', label: 'Datasets', hint: 'Snapshot recordings' },
  { href: '/estimates', label: 'Estimates', hint: 'Bearings and bounds' },
  { href: '/bearing-time-records', label: 'Bearing–time', hint: 'Long recordings and tracks' },
  { href: '/handoff', label: 'Hand-off', hint: 'Bundles, e-mail, sign-off' },
  { href: '/studies', label: 'Studies', hint: 'Monte Carlo accuracy vs the CRB' },
  { href: '/plans', label: 'Planner', hint: 'Elements and snapshots for a target' },
];

export const teamNav: NavItem[] = [
  { href: '/team', label: 'Team', hint: 'Members and invitations' },
  { href: '/outbox', label: 'Outbox', hint: 'Captured e-mail', adminOnly: true },
  { href: '/audit', label: 'Audit log', hint: 'Who did what', adminOnly: true },
  { href: '/account', label: 'Account', hint: 'Profile, password, tokens' },
];

function isActive(pathname: string, href: string) {
  return href === '/' ? pathname === '/' : pathname === href || pathname.startsWith(`${href}/`);
}

function NavLinks({ items, pathname, onNavigate }: { items: NavItem[]; pathname: string; onNavigate?: () => void }) {
  return (
    <ul className="space-y-0.5">
      {items.map((item) => {
        const active = isActive(pathname, item.href);
        return (
          <li key={item.href}>
            <Link
              href={item.href}
              onClick={onNavigate}
              aria-current={active ? 'page' : undefined}
              className={cn(
                'group flex items-center gap-3 rounded-md px-3 py-2 text-sm transition-colors focus-visible:outline-2 focus-visible:outline-offset-1 focus-visible:outline-glass-300',
                active ? 'bg-ink-800 text-white' : 'text-ink-300 hover:bg-ink-900 hover:text-white',
              )}
            >
              <span
                aria-hidden
                className={cn(
                  'h-4 w-0.5 rounded-full',
                  active ? 'bg-glass-300' : 'bg-transparent group-hover:bg-ink-600',
                )}
              />
              <span className="flex-1">
                <span className="block font-medium">{item.label}</span>
                <span className={cn('block text-2xs', active ? 'text-ink-300' : 'text-ink-500')}>{item.hint}</span>
              </span>
            </Link>
          </li>
        );
      })}
    </ul>
  );
}

export function NavRail({ user }: { user: { name: string; email: string; role: string; teamName: string } }) {
  const pathname = usePathname() ?? '/';
  const [open, setOpen] = useState(false);
  const team = teamNav.filter((i) => !i.adminOnly || user.role === 'admin');
  const body = (
    <>
      <nav aria-label="Main" className="space-y-6">
        <div>
          <p className="px-3 pb-1.5 text-2xs font-semibold tracking-[0.14em] text-ink-500 uppercase">Work</p>
          <NavLinks items={mainNav} pathname={pathname} onNavigate={() => setOpen(false)} />
        </div>
        <div>
          <p className="px-3 pb-1.5 text-2xs font-semibold tracking-[0.14em] text-ink-500 uppercase">Team</p>
          <NavLinks items={team} pathname={pathname} onNavigate={() => setOpen(false)} />
        </div>
      </nav>
      <div className="mt-auto border-t border-ink-800 pt-4">
        <p className="truncate px-3 text-sm font-medium text-white">{user.name}</p>
        <p className="truncate px-3 text-2xs text-ink-400">{user.email}</p>
        <p className="mt-1 px-3 text-2xs text-ink-400">
          <span className="rounded bg-ink-800 px-1.5 py-0.5 font-mono text-glass-200" data-testid="current-role">
            {user.role}
          </span>{' '}
          · {user.teamName}
        </p>
        <button
          type="button"
          onClick={() => signOut({ callbackUrl: '/login' })}
          className="mt-3 w-full rounded-md px-3 py-2 text-left text-sm text-ink-300 hover:bg-ink-900 hover:text-white focus-visible:outline-2 focus-visible:outline-glass-300"
        >
          Sign out
        </button>
      </div>
    </>
  );
  return (
    <>
      <div className="flex items-center justify-between bg-ink-950 px-4 py-3 lg:hidden">
        <Brand />
        <button
          type="button"
          aria-expanded={open}
          aria-controls="mobile-nav"
          onClick={() => setOpen((v) => !v)}
          className="rounded-md px-3 py-1.5 text-sm text-ink-200 ring-1 ring-ink-700 focus-visible:outline-2 focus-visible:outline-glass-300"
        >
          {open ? 'Close' : 'Menu'}
        </button>
      </div>
      {open ? (
        <div id="mobile-nav" className="flex flex-col gap-6 bg-ink-950 px-3 pb-5 lg:hidden">
          {body}
        </div>
      ) : null}
      <aside className="hidden w-64 shrink-0 flex-col gap-8 bg-ink-950 px-3 py-5 lg:sticky lg:top-0 lg:flex lg:h-screen">
        <div className="px-3">
          <Brand />
        </div>
        {body}
      </aside>
    </>
  );
}

export function Brand() {
  return (
    <span className="flex items-center gap-2 text-white">
      <svg aria-hidden width="22" height="22" viewBox="0 0 22 22">
        <path d="M3 16 Q11 2 19 16" fill="none" stroke="#75cfbd" strokeWidth="1.6" />
        <path d="M6 16 Q11 8 16 16" fill="none" stroke="#46b5a1" strokeWidth="1.6" />
        {[3, 7, 11, 15, 19].map((x) => (
          <circle key={x} cx={x} cy="19" r="1.4" fill="#d3f2ea" />
        ))}
      </svg>
      <span className="text-[15px] font-semibold tracking-tight">Steerwise</span>
    </span>
  );
}
