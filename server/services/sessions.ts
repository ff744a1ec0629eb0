// Sessions with lucia 3 over its PostgreSQL adapter (table user_sessions).
// Session ids are random and stored as they are; a sign-in always creates a new
// one (no fixation), sign-out and password changes delete them.

import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql';
import { Lucia, TimeSpan } from 'lucia';
import type pg from 'pg';
import type { Role } from '../../shared/roles';
import type { Config } from '../config';

interface UserRow {
  email: string;
  name: string;
  roles: Role[];
  team_id: string | null;
  disabled: boolean;
}

export function createLucia(pool: pg.Pool, config: Pick<Config, 'sessionCookieName' | 'sessionTtlSeconds' | 'isProduction'>) {
  return new Lucia(new NodePostgresAdapter(pool, { user: 'users', session: 'user_sessions' }), {
    sessionExpiresIn: new TimeSpan(config.sessionTtlSeconds, 's'),
    sessionCookie: {
      name: config.sessionCookieName,
      expires: true,
      // The cookie is written by server/api/middleware/auth.ts, which decides Secure per request.
      attributes: { sameSite: 'lax', secure: config.isProduction },
    },
    getUserAttributes: (row) => ({
      email: row.email,
      name: row.name,
      roles: row.roles,
      teamId: row.team_id,
      disabled: row.disabled,
    }),
  });
}

export type KeepwellLucia = ReturnType<typeof createLucia>;

declare module 'lucia' {
  interface Register {
    Lucia: KeepwellLucia;
    DatabaseUserAttributes: UserRow;
  }
}
