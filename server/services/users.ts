// Team members: the views the API returns and the admin's changes to them.

import type { AdminUser } from '../../shared/api/admin';
import type { User as UserView } from '../../shared/api/auth';
import type { Role } from '../../shared/roles';
import type { AppContext } from '../context';
import { Team, User } from '../db/models';
import { conflict, notFound } from '../errors';
import { recordAudit } from './audit';

export function userView(user: User): UserView {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    roles: user.roles,
    teamId: user.teamId ?? null,
    teamName: user.team?.name ?? null,
  };
}

export function adminUserView(user: User): AdminUser {
  return {
    ...userView(user),
    disabled: user.disabled,
    status: user.disabled ? 'disabled' : user.passwordHash ? 'active' : 'invited',
    createdAt: user.createdAt.toISOString(),
    lastSignInAt: user.lastSignInAt ? user.lastSignInAt.toISOString() : null,
  };
}

const withTeam = { include: [{ model: Team, as: 'team' }] };

export async function findUserView(id: string): Promise<UserView | null> {
  const user = await User.findByPk(id, withTeam);
  return user ? userView(user) : null;
}

export async function listTeamUsers(teamId: string): Promise<AdminUser[]> {
  const users = await User.findAll({ where: { teamId }, ...withTeam, order: [['name', 'ASC'], ['email', 'ASC']] });
  return users.map(adminUserView);
}

export async function updateTeamUser(
  ctx: AppContext,
  actor: { id: string; teamId: string },
  userId: string,
  change: { roles?: Role[]; disabled?: boolean },
): Promise<AdminUser> {
  const updated = await ctx.sequelize.transaction(async (transaction) => {
    // FOR UPDATE cannot lock the outer side of the team join: lock the user row alone, then load its team.
    const user = await User.findOne({ where: { id: userId, teamId: actor.teamId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!user) throw notFound('User');
    if (user.id === actor.id && change.disabled === true) throw conflict('You cannot disable your own account.');
    if (user.id === actor.id && change.roles && !change.roles.includes('admin')) {
      throw conflict('You cannot remove your own administrator role; ask another administrator.');
    }
    const before = { roles: user.roles, disabled: user.disabled };
    if (change.roles) user.roles = [...new Set(change.roles)];
    if (change.disabled !== undefined) user.disabled = change.disabled;
    await user.save({ transaction });
    user.team = await Team.findByPk(actor.teamId, { transaction });
    await recordAudit(
      {
        teamId: actor.teamId,
        actorId: actor.id,
        action: 'user.update',
        subjectType: 'user',
        subjectId: user.id,
        detail: { before, after: { roles: user.roles, disabled: user.disabled } },
      },
      transaction,
    );
    return user;
  });
  // A disabled account loses its sessions at once.
  if (updated.disabled) await ctx.lucia.invalidateUserSessions(updated.id);
  return adminUserView(updated);
}
