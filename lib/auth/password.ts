import { hash, verify } from "@node-rs/argon2";

// argon2id with the library's defaults (m = 19456 KiB, t = 2, p = 1), the OWASP minimum.
const OPTIONS = { algorithm: 2 /* Argon2id */ } as const;

export { MIN_PASSWORD_LENGTH } from "./password-rules";

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

// Verified against when the e-mail is unknown, so an unknown user costs as long as a wrong password.
let dummyHash: Promise<string> | undefined;
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword("no-such-user-placeholder-password");
  return dummyHash;
}
