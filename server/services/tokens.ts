// Secret tokens carried by links (password reset, invitation) and API clients.
// Only an HMAC of a token is stored, keyed by KEEPWELL_SECRET, so a copy of the
// database alone cannot be turned into working links.

import crypto from 'node:crypto';

/** 256 random bits, base64url (43 characters). */
export function newToken(): string {
  return crypto.randomBytes(32).toString('base64url');
}

export function hashToken(secret: string, token: string): string {
  return crypto.createHmac('sha256', secret).update(token).digest('hex');
}
