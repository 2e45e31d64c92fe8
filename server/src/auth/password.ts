import argon2 from 'argon2';

/**
 * argon2id with the OWASP Password Storage Cheat Sheet's first recommended
 * setting: m = 19 MiB, t = 2, p = 1.
 */
const OPTIONS = { type: argon2.argon2id, memoryCost: 19_456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(plain: string): Promise<string> {
  return argon2.hash(plain, OPTIONS);
}

export async function verifyPassword(hash: string, plain: string): Promise<boolean> {
  try {
    return await argon2.verify(hash, plain);
  } catch {
    return false;
  }
}

/** A fixed hash to verify against when the account does not exist, so timing does not reveal which emails exist. */
let dummyHash: Promise<string> | undefined;
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword('not-a-real-password-for-timing-only');
  return dummyHash;
}
