'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import { Badge, roleTone } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { FormMessage } from '@/components/ui/field';
import { apiSend } from '@/lib/client/fetcher';
import type { MemberDto } from '@/lib/data/dto';

const roleOptions = ['admin', 'engineer', 'reviewer', 'viewer'] as const;

export function MembersTable({
  members,
  canManage,
  selfId,
}: {
  members: MemberDto[];
  canManage: boolean;
  selfId: number;
}) {
  const router = useRouter();
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);

  async function run(action: () => Promise<unknown>, ok: string) {
    setMessage(null);
    try {
      await action();
      setMessage({ tone: 'ok', text: ok });
      router.refresh();
    } catch (err) {
      setMessage({ tone: 'error', text: (err as Error).message });
    }
  }

  const columns: ColumnDef<MemberDto, unknown>[] = [
    {
      accessorKey: 'name',
      header: 'Name',
      cell: ({ row }) => <span className="font-medium">{row.original.name}</span>,
    },
    {
      accessorKey: 'email',
      header: 'E-mail',
      cell: ({ row }) => <span className="font-mono text-xs">{row.original.email}</span>,
    },
    {
      accessorKey: 'role',
      header: 'Role',
      cell: ({ row }) =>
        canManage && row.original.id !== selfId ? (
          <>
            <label htmlFor={`role-${row.original.id}`} className="sr-only">
              Role of {row.original.name}
            </label>
            <select
              id={`role-${row.original.id}`}
              defaultValue={row.original.role}
              onChange={(e) =>
                run(
                  () => apiSend('PATCH', `/api/team/members/${row.original.id}`, { role: e.target.value }),
                  `${row.original.name} is now ${e.target.value}.`,
                )
              }
              className="rounded-md border border-ink-200 bg-white px-2 py-1 text-sm"
            >
              {roleOptions.map((r) => (
                <option key={r} value={r}>
                  {r}
                </option>
              ))}
            </select>
          </>
        ) : (
          <Badge tone={roleTone[row.original.role]}>{row.original.role}</Badge>
        ),
    },
    {
      accessorKey: 'createdAt',
      header: 'Joined',
      cell: ({ row }) => <span className="text-ink-500 tabular">{row.original.createdAt.slice(0, 10)}</span>,
    },
  ];
  if (canManage) {
    columns.push({
      id: 'actions',
      header: () => <span className="sr-only">Actions</span>,
      enableSorting: false,
      cell: ({ row }) =>
        row.original.id === selfId ? (
          <span className="text-xs text-ink-400">you</span>
        ) : (
          <Button
            variant="danger"
            className="px-2 py-1 text-xs"
            onClick={() => {
              if (window.confirm(`Remove ${row.original.name} from the team?`))
                void run(
                  () => apiSend('DELETE', `/api/team/members/${row.original.id}`),
                  `${row.original.name} was removed.`,
                );
            }}
          >
            Remove
          </Button>
        ),
    });
  }
  return (
    <>
      {message ? (
        <div className="px-5 pt-3">
          <FormMessage tone={message.tone}>{message.text}</FormMessage>
        </div>
      ) : null}
      <DataTable
        data={members}
        columns={columns}
        label="Team members"
        filterPlaceholder="Filter by name, e-mail or role"
        initialSort={[{ id: 'name', desc: false }]}
      />
    </>
  );
}
