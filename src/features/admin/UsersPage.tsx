import { useQuery } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import type { AdminUser } from '../../../shared/api/admin';
import { updateUserBodySchema } from '../../../shared/api/auth';
import { ROLE_LABELS, ROLES, type Role } from '../../../shared/roles';
import { Button } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { Checkbox } from '../../components/Field';
import { Icon } from '../../components/Icon';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { PageHeader } from '../../components/PageHeader';
import { ToneBadge, type Tone } from '../../design/severity';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDateTime } from '../../lib/format';
import { useCan, useCurrentUser } from '../../lib/session';
import { InviteForm } from './InviteForm';
import { adminUsersQuery, useUpdateUser } from './queries';

const STATUS: Record<AdminUser['status'], { tone: Tone; label: string }> = {
  active: { tone: 'ok', label: 'Active' },
  invited: { tone: 'info', label: 'Invited' },
  disabled: { tone: 'waived', label: 'Disabled' },
};

function RoleChips({ roles }: { roles: Role[] }) {
  return (
    <ul className="flex flex-wrap gap-1.5" aria-label="Roles">
      {roles.map((r) => (
        <li key={r} className="rounded border border-ink-200 bg-ink-50 px-1.5 py-0.5 text-xs font-medium text-ink-700">
          {ROLE_LABELS[r]}
        </li>
      ))}
    </ul>
  );
}

function RoleEditor({ user, isSelf, onClose }: { user: AdminUser; isSelf: boolean; onClose: () => void }) {
  const [roles, setRoles] = useState<Role[]>(user.roles);
  const update = useUpdateUser();
  const check = updateUserBodySchema.safeParse({ roles });
  const toggle = (role: Role, on: boolean) => setRoles((current) => (on ? ROLES.filter((r) => r === role || current.includes(r)) : current.filter((r) => r !== role)));

  return (
    <form
      aria-label={`Roles of ${user.name}`}
      className="space-y-2"
      onSubmit={(e) => {
        e.preventDefault();
        if (check.success) update.mutate({ id: user.id, roles }, { onSuccess: onClose });
      }}
    >
      {ROLES.map((role) => {
        const ownAdmin = isSelf && role === 'admin';
        return (
          <Checkbox
            key={role}
            label={ROLE_LABELS[role]}
            description={ownAdmin ? 'You cannot remove your own administrator role.' : undefined}
            checked={roles.includes(role)}
            disabled={ownAdmin}
            onChange={(e) => toggle(role, e.target.checked)}
          />
        );
      })}
      {!check.success && <p className="text-xs font-medium text-error">■ Choose at least one role.</p>}
      {update.isError && <ErrorNotice error={update.error} title="Roles not changed" />}
      <div className="flex gap-2 pt-1">
        <Button type="submit" size="sm" variant="primary" busy={update.isPending} disabled={!check.success}>
          Save roles
        </Button>
        <Button size="sm" onClick={onClose}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

function AccessToggle({ user }: { user: AdminUser }) {
  const [confirming, setConfirming] = useState(false);
  const update = useUpdateUser();
  if (user.disabled)
    return (
      <Button size="sm" busy={update.isPending} onClick={() => update.mutate({ id: user.id, disabled: false })}>
        Enable
      </Button>
    );
  if (!confirming)
    return (
      <Button size="sm" onClick={() => setConfirming(true)}>
        Disable…
      </Button>
    );
  return (
    <span className="inline-flex items-center gap-1.5">
      <Button size="sm" variant="danger" busy={update.isPending} onClick={() => update.mutate({ id: user.id, disabled: true }, { onSettled: () => setConfirming(false) })}>
        Disable {user.name.split(' ')[0]}
      </Button>
      <Button size="sm" variant="ghost" onClick={() => setConfirming(false)}>
        Keep
      </Button>
    </span>
  );
}

export function UsersPage() {
  useDocumentTitle('Users & invitations');
  const me = useCurrentUser();
  const users = useQuery(adminUsersQuery);
  const canReadOutbox = useCan('outbox.read');
  const [inviting, setInviting] = useState(false);
  const [invited, setInvited] = useState<string | null>(null);
  const [editing, setEditing] = useState<string | null>(null);

  const columns = useMemo<ColumnDef<AdminUser, any>[]>(
    () => [
      {
        accessorKey: 'name',
        header: 'Person',
        cell: ({ row }) => (
          <div>
            <p className="font-medium text-ink-900">
              {row.original.name}
              {row.original.id === me.id && <span className="ml-1.5 text-xs font-normal text-ink-500">(you)</span>}
            </p>
            <p className="text-ink-500">{row.original.email}</p>
          </div>
        ),
      },
      {
        id: 'roles',
        header: 'Roles',
        enableSorting: false,
        cell: ({ row }) =>
          editing === row.original.id ? (
            <RoleEditor user={row.original} isSelf={row.original.id === me.id} onClose={() => setEditing(null)} />
          ) : (
            <RoleChips roles={row.original.roles} />
          ),
      },
      {
        accessorKey: 'status',
        header: 'Status',
        cell: ({ row }) => <ToneBadge tone={STATUS[row.original.status].tone} label={STATUS[row.original.status].label} />,
      },
      {
        accessorKey: 'lastSignInAt',
        header: 'Last sign-in',
        sortUndefined: 'last',
        cell: ({ getValue }) => <span className="whitespace-nowrap tabular-nums text-ink-600">{getValue() ? formatDateTime(getValue() as string) : 'Never'}</span>,
      },
      {
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        enableSorting: false,
        cell: ({ row }) => (
          <div className="flex justify-end gap-1.5">
            {editing !== row.original.id && (
              <Button size="sm" onClick={() => setEditing(row.original.id)} aria-label={`Edit roles of ${row.original.name}`}>
                Edit roles
              </Button>
            )}
            {row.original.id !== me.id && <AccessToggle user={row.original} />}
          </div>
        ),
      },
    ],
    [editing, me.id],
  );

  return (
    <>
      <PageHeader
        title="Users & invitations"
        description="Everyone on your team, what they may do, and who has not accepted an invitation yet."
        actions={
          !inviting && (
            <Button variant="primary" onClick={() => setInviting(true)}>
              <Icon name="plus" /> Invite someone
            </Button>
          )
        }
      />
      {invited && !inviting && (
        <Notice tone="ok" title="Invitation sent" className="mb-6">
          An invitation is on its way to <strong>{invited}</strong>.{' '}
          {canReadOutbox && (
            <>
              You can follow its delivery in the{' '}
              <Link to="/admin/outbox" className="font-medium text-well-700 underline">
                outbox
              </Link>
              .
            </>
          )}
        </Notice>
      )}
      {inviting && (
        <InviteForm
          onCancel={() => setInviting(false)}
          onDone={(email) => {
            setInviting(false);
            setInvited(email);
          }}
        />
      )}
      {users.isPending && <Loading label="Loading the team…" />}
      {users.isError && <ErrorNotice error={users.error} title="Could not load the team" />}
      {users.data && <DataTable caption="Team members" data={users.data} columns={columns} rowKey={(u) => u.id} initialSorting={[{ id: 'name', desc: false }]} />}
    </>
  );
}
