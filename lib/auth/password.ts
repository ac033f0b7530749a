import "server-only";
import { hash, verify } from "@node-rs/argon2";

// argon2id (the package default) with the OWASP minimum: 19 MiB, 2 passes, 1 lane.
const options = { memoryCost: 19456, timeCost: 2, outputLen: 32, parallelism: 1 } as const;

/** Hashes a password with argon2id; returns a PHC string. */
export function hashPassword(password: string): Promise<string> {
  return hash(password, options);
}

/** Checks a password against a PHC hash; false (not an exception) for a malformed hash. */
export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

let dummyHash: Promise<string> | undefined;

/**
 * Spends the same work as a real check when the e-mail is unknown, so response times do
 * not reveal which addresses have accounts.
 */
export async function verifyAgainstDummy(password: string): Promise<false> {
  dummyHash ??= hashPassword("no account has this password");
  await verifyPassword(await dummyHash, password);
  return false;
}
