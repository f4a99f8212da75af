import { hash, verify } from '@node-rs/argon2';

// Argon2id with the OWASP Password Storage Cheat Sheet's first listed setting (19 MiB, t=2, p=1).
// 2 is Argon2id in @node-rs/argon2's Algorithm enum (a const enum, not importable under isolatedModules).
const OPTIONS = { algorithm: 2, memoryCost: 19456, timeCost: 2, parallelism: 1, outputLen: 32 } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, OPTIONS);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

// A hash of a random password, verified against when the account does not exist, so that the
// response time does not tell which e-mail addresses have accounts.
let decoy: Promise<string> | undefined;
export function decoyHash(): Promise<string> {
  return (decoy ??= hashPassword(`decoy-${Math.random()}-${Date.now()}`));
}
