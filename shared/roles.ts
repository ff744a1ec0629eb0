// Who may do what. The server checks every route against this table and the
// client hides what the signed-in user's roles cannot do; both import it from here.

export const ROLES = ['designer', 'methodology', 'reviewer', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  designer: 'Designer',
  methodology: 'Methodology owner',
  reviewer: 'Reviewer',
  admin: 'Administrator',
};

export const PERMISSIONS = {
  /** Read blocks, runs, findings, decks, reports (every signed-in user). */
  'design.read': ['designer', 'methodology', 'reviewer', 'admin'],
  'block.create': ['designer', 'methodology', 'admin'],
  'run.submit': ['designer', 'methodology'],
  /** Cancel a run; designers may cancel their own, admins any. */
  'run.cancel': ['designer', 'methodology', 'admin'],
  'deck.edit': ['methodology', 'admin'],
  'deck.publish': ['methodology', 'admin'],
  'waiver.request': ['designer'],
  /** Approve, reject, or waive directly. */
  'waiver.decide': ['reviewer'],
  'waiver.revoke': ['reviewer', 'admin'],
  'user.manage': ['admin'],
  'outbox.read': ['admin'],
  'audit.read': ['methodology', 'reviewer', 'admin'],
  /** Personal API tokens: every user manages their own. */
  'token.manage': ['designer', 'methodology', 'reviewer', 'admin'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(roles: readonly Role[] | undefined | null, permission: Permission): boolean {
  if (!roles) return false;
  const allowed: readonly Role[] = PERMISSIONS[permission];
  return roles.some((r) => allowed.includes(r));
}
