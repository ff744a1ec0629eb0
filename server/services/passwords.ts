// Password hashing with Argon2id (@node-rs/argon2). Its defaults (m = 19 MiB,
// t = 2, p = 1) are the minimum OWASP's Password Storage Cheat Sheet recommends.

import { hash, verify } from '@node-rs/argon2';

export function hashPassword(password: string): Promise<string> {
  return hash(password);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

let dummyHash: Promise<string> | undefined;
/** Spend the time a real verification would, so that an unknown e-mail answers as slowly as a wrong password. */
export async function verifyAgainstNothing(password: string): Promise<false> {
  dummyHash ??= hash('keepwell-timing-equaliser');
  await verifyPassword(await dummyHash, password);
  return false;
}
