// Signing in, resetting a password by mail, and inviting new team members.
// Reset and invitation links carry a random token; only its HMAC is stored, it
// works once, and it expires (KEEPWELL_RESET_TTL_SECONDS, KEEPWELL_INVITE_TTL_SECONDS).

import { Op } from 'sequelize';
import type { Session } from 'lucia';
import type { Role } from '../../shared/roles';
import type { AppContext } from '../context';
import { Invitation, PasswordResetToken, Team, User } from '../db/models';
import { conflict, HttpError, notFound } from '../errors';
import { invitationMail, passwordResetMail } from '../mail/templates';
import { recordAudit } from './audit';
import { hashPassword, verifyAgainstNothing, verifyPassword } from './passwords';
import { hashToken, newToken } from './tokens';
import { adminUserView } from './users';

const invalidCredentials = () => new HttpError(401, 'invalid-credentials', 'The e-mail or password is not right.');
const invalidToken = () => new HttpError(400, 'invalid-token', 'This link is not valid any more. Ask for a new one.');

/** The user whose password this is, or a 401 that says nothing about which part was wrong. */
export async function checkCredentials(email: string, password: string): Promise<User> {
  const user = await User.findOne({ where: { email: email.toLowerCase() }, include: [{ model: Team, as: 'team' }] });
  if (!user || !user.passwordHash) {
    await verifyAgainstNothing(password);
    throw invalidCredentials();
  }
  const ok = await verifyPassword(user.passwordHash, password);
  if (!ok || user.disabled) throw invalidCredentials();
  return user;
}

/**
 * Start a session for a user who has just proven who they are. Any session the
 * browser already had is ended first, so a planted session id never becomes a
 * signed-in one (session fixation).
 */
export async function startSession(ctx: AppContext, user: User, previousSessionId: string | null): Promise<Session> {
  if (previousSessionId) await ctx.lucia.invalidateSession(previousSessionId);
  const session = await ctx.lucia.createSession(user.id, {});
  await User.update({ lastSignInAt: new Date() }, { where: { id: user.id } });
  await recordAudit({ teamId: user.teamId ?? null, actorId: user.id, action: 'auth.sign-in', subjectType: 'user', subjectId: user.id });
  return session;
}

export async function endSession(ctx: AppContext, session: Session, user: { id: string; teamId: string | null }): Promise<void> {
  await ctx.lucia.invalidateSession(session.id);
  await recordAudit({ teamId: user.teamId, actorId: user.id, action: 'auth.sign-out', subjectType: 'user', subjectId: user.id });
}

// ---------------------------------------------------------------- password reset

/** Always succeeds from the caller's point of view: whether the address is known is never revealed. */
export async function requestPasswordReset(ctx: AppContext, email: string): Promise<void> {
  const user = await User.findOne({ where: { email: email.toLowerCase() } });
  if (!user || user.disabled || !user.passwordHash) return;
  const token = newToken();
  await ctx.sequelize.transaction(async (transaction) => {
    // Only the newest link works.
    await PasswordResetToken.update({ usedAt: new Date() }, { where: { userId: user.id, usedAt: null }, transaction });
    await PasswordResetToken.create(
      {
        userId: user.id,
        tokenHash: hashToken(ctx.config.secret, token),
        expiresAt: new Date(Date.now() + ctx.config.resetTokenTtlSeconds * 1000),
        usedAt: null,
      },
      { transaction },
    );
    const link = `${ctx.config.publicUrl}/reset-password?token=${encodeURIComponent(token)}`;
    const mail = passwordResetMail({ name: user.name, link, validMinutes: Math.round(ctx.config.resetTokenTtlSeconds / 60) });
    await ctx.outbox.enqueue({ to: user.email, teamId: user.teamId ?? null, ...mail }, transaction);
    await recordAudit(
      { teamId: user.teamId ?? null, actorId: user.id, action: 'auth.password-reset-requested', subjectType: 'user', subjectId: user.id },
      transaction,
    );
  });
}

export async function confirmPasswordReset(ctx: AppContext, token: string, password: string): Promise<void> {
  const passwordHash = await hashPassword(password);
  const userId = await ctx.sequelize.transaction(async (transaction) => {
    const row = await PasswordResetToken.findOne({
      where: { tokenHash: hashToken(ctx.config.secret, token), usedAt: null, expiresAt: { [Op.gt]: new Date() } },
      transaction,
      lock: transaction.LOCK.UPDATE,
    });
    if (!row) throw invalidToken();
    const user = await User.findByPk(row.userId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!user || user.disabled) throw invalidToken();
    row.usedAt = new Date();
    await row.save({ transaction });
    user.passwordHash = passwordHash;
    await user.save({ transaction });
    await recordAudit(
      { teamId: user.teamId ?? null, actorId: user.id, action: 'auth.password-reset', subjectType: 'user', subjectId: user.id },
      transaction,
    );
    return user.id;
  });
  // Whoever knew the old password is signed out everywhere.
  await ctx.lucia.invalidateUserSessions(userId);
}

// ---------------------------------------------------------------- invitations

export async function inviteUser(
  ctx: AppContext,
  actor: { id: string; name: string; teamId: string },
  input: { email: string; name: string; roles: Role[] },
) {
  const token = newToken();
  const user = await ctx.sequelize.transaction(async (transaction) => {
    const team = await Team.findByPk(actor.teamId, { transaction });
    if (!team) throw notFound('Team');
    let invitee = await User.findOne({ where: { email: input.email }, transaction, lock: transaction.LOCK.UPDATE });
    if (invitee && (invitee.passwordHash || invitee.teamId !== actor.teamId)) {
      throw conflict('Someone with this e-mail address already has an account.');
    }
    const roles = [...new Set(input.roles)];
    if (invitee) {
      // Inviting again: the newest link replaces the earlier ones.
      invitee.name = input.name;
      invitee.roles = roles;
      await invitee.save({ transaction });
      await Invitation.update({ usedAt: new Date() }, { where: { userId: invitee.id, usedAt: null }, transaction });
    } else {
      invitee = await User.create(
        { email: input.email, name: input.name, roles, teamId: actor.teamId, passwordHash: null, lastSignInAt: null },
        { transaction },
      );
    }
    await Invitation.create(
      {
        teamId: actor.teamId,
        userId: invitee.id,
        email: invitee.email,
        invitedBy: actor.id,
        tokenHash: hashToken(ctx.config.secret, token),
        expiresAt: new Date(Date.now() + ctx.config.inviteTokenTtlSeconds * 1000),
        usedAt: null,
      },
      { transaction },
    );
    const link = `${ctx.config.publicUrl}/accept-invite?token=${encodeURIComponent(token)}`;
    const mail = invitationMail({
      name: invitee.name,
      inviter: actor.name,
      team: team.name,
      link,
      validDays: Math.max(1, Math.round(ctx.config.inviteTokenTtlSeconds / 86400)),
    });
    await ctx.outbox.enqueue({ to: invitee.email, teamId: actor.teamId, ...mail }, transaction);
    await recordAudit(
      { teamId: actor.teamId, actorId: actor.id, action: 'user.invite', subjectType: 'user', subjectId: invitee.id, detail: { email: invitee.email, roles } },
      transaction,
    );
    invitee.team = team;
    return invitee;
  });
  return adminUserView(user);
}

/** Set the invited user's password; the caller then starts their session. */
export async function acceptInvitation(ctx: AppContext, token: string, password: string): Promise<User> {
  const passwordHash = await hashPassword(password);
  const userId = await ctx.sequelize.transaction(async (transaction) => {
    const invitation = await Invitation.findOne({
      where: { tokenHash: hashToken(ctx.config.secret, token), usedAt: null, expiresAt: { [Op.gt]: new Date() } },
      transaction,
      lock: transaction.LOCK.UPDATE,
    });
    if (!invitation) throw invalidToken();
    const user = await User.findByPk(invitation.userId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!user || user.disabled || user.passwordHash) throw invalidToken();
    invitation.usedAt = new Date();
    await invitation.save({ transaction });
    user.passwordHash = passwordHash;
    await user.save({ transaction });
    await recordAudit(
      { teamId: invitation.teamId, actorId: user.id, action: 'user.accept-invitation', subjectType: 'user', subjectId: user.id },
      transaction,
    );
    return user.id;
  });
  return (await User.findByPk(userId, { include: [{ model: Team, as: 'team' }] }))!;
}
