import Link from 'next/link';
import { PageHeader } from '@/components/ui/page-header';
import { Card } from '@/components/ui/card';
import { Badge, roleTone } from '@/components/ui/badge';
import { requireUser } from '@/lib/auth';
import { getTeam, listMembers } from '@/lib/data/team';
import { can } from '@/lib/auth/permissions';

export const metadata = { title: 'Overview' };

const roleSummary = {
  admin: 'You manage members, invitations and team settings, and can do everything engineers and reviewers do.',
  engineer: 'You design arrays, upload trial recordings and run bearing estimates.',
  reviewer: 'You read everything, comment, and sign off array revisions and estimate runs.',
  viewer: 'You can read arrays, datasets and estimates. Changes need an engineer or admin.',
} as const;

export default async function OverviewPage() {
  const user = await requireUser();
  const [team, members] = await Promise.all([getTeam({ caller: user }), listMembers({ caller: user })]);
  const areas = [
    {
      href: '/arrays',
      title: 'Arrays',
      text: 'Element count and spacing for a band; beam, sidelobes, grating-lobe-free scan and the resolvable gap, saved as revisions.',
      action: can(user.role, 'arrays.edit') ? 'Design an array' : 'Browse arrays',
    },
    {
      href: '/datasets',
      title: 'Datasets',
      text: 'Multichannel snapshot files from trials (CSV, NPY, HDF5, WAV), checked channel by channel.',
      action: can(user.role, 'datasets.upload') ? 'Upload a recording' : 'Browse datasets',
    },
    {
      href: '/estimates',
      title: 'Estimates',
      text: 'Bearings from ESPRIT- and MUSIC-family methods, side by side, with ±1σ from the Cramér–Rao bound.',
      action: can(user.role, 'estimates.run') ? 'Run an estimate' : 'Browse estimates',
    },
    {
      href: '/handoff',
      title: 'Hand-off',
      text: 'Checked, reproducible bundles of an array revision and its runs for a colleague, sent by e-mail, with review and sign-off.',
      action: can(user.role, 'arrays.edit') ? 'Send or import a bundle' : 'Open hand-off',
    },
    {
      href: '/studies',
      title: 'Studies',
      text: 'Seeded Monte Carlo runs that predict bearing accuracy against the Cramér–Rao bound before hardware exists.',
      action: can(user.role, 'studies.run') ? 'Start a study' : 'Browse studies',
    },
  ];
  return (
    <>
      <PageHeader
        kicker={team.name}
        title={`Good to see you, ${user.name.split(' ')[0]}`}
        description={roleSummary[user.role]}
      />
      <div className="grid gap-4 md:grid-cols-2">
        {areas.map((a) => (
          <Card key={a.href} className="flex flex-col p-5">
            <h2 className="text-base font-semibold">{a.title}</h2>
            <p className="mt-1 flex-1 text-sm leading-relaxed text-ink-600">{a.text}</p>
            <Link
              href={a.href}
              className="mt-4 text-sm font-medium text-glass-700 hover:text-glass-900 hover:underline"
            >
              {a.action} →
            </Link>
          </Card>
        ))}
      </div>
      <Card className="mt-6 p-5">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 className="text-base font-semibold">Team</h2>
          <Link href="/team" className="text-sm font-medium text-glass-700 hover:underline">
            {can(user.role, 'team.manage') ? 'Manage members' : 'See members'} →
          </Link>
        </div>
        <ul className="mt-3 flex flex-wrap gap-2">
          {members.map((m) => (
            <li key={m.id} className="flex items-center gap-2 rounded-md bg-ink-50 px-2.5 py-1.5 text-sm">
              {m.name} <Badge tone={roleTone[m.role]}>{m.role}</Badge>
            </li>
          ))}
        </ul>
      </Card>
    </>
  );
}
