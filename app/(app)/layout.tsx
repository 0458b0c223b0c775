import { NavRail } from '@/components/shell/nav-rail';
import { Cautions } from '@/components/shell/cautions';
import { requireUser } from '@/lib/auth';
import { Team } from '@/models';

export const dynamic = 'force-dynamic';

/** The signed-in shell. The role check here is for the navigation only; pages and handlers check again. */
export default async function AppLayout({ children }: { children: React.ReactNode }) {
  const user = await requireUser();
  const team = await Team.findByPk(user.teamId);
  return (
    <div className="lg:flex lg:bg-[linear-gradient(to_right,#0a121b_16rem,transparent_16rem)]">
      <a
        href="#main"
        className="absolute top-2 left-2 z-50 -translate-y-20 rounded-md bg-white px-3 py-2 text-sm font-medium text-ink-900 shadow-card transition-transform focus:translate-y-0"
      >
        Skip to content
      </a>
      <NavRail user={{ name: user.name, email: user.email, role: user.role, teamName: team?.name ?? '' }} />
      <div className="min-w-0 flex-1">
        <main id="main" tabIndex={-1} className="mx-auto max-w-6xl px-4 py-8 sm:px-8 focus:outline-hidden">
          {children}
          <Cautions />
        </main>
      </div>
    </div>
  );
}
