// Password hashing with argon2id (RFC 9106). Parameters are the library defaults (19 MiB, t=2, p=1),
// OWASP's minimum recommendation for argon2id.
import { hash, verify } from "@node-rs/argon2";

// `Algorithm` is a const enum the compiler cannot inline across packages; 2 is Argon2id in @node-rs/argon2.
const ARGON2ID = 2;

export const MIN_PASSWORD_LENGTH = 10;

export function hashPassword(password: string): Promise<string> {
  return hash(password, { algorithm: ARGON2ID });
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

// Verified against when the e-mail is unknown, so both failures take about the same time.
let decoyHash: Promise<string> | undefined;
export function decoy(): Promise<string> {
  decoyHash ??= hashPassword("decoy password that never matches");
  return decoyHash;
}
