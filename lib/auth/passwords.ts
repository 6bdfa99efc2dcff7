// Password hashing with bcryptjs (Provos & Mazières 1999, "A Future-Adaptable Password Scheme", USENIX).
import bcrypt from "bcryptjs";
import { randomBytes } from "node:crypto";
import { BCRYPT_MAX_BYTES } from "@/lib/api/schemas";

// Cost 10 is OWASP's floor for bcrypt; bcryptjs is pure JavaScript (several times slower than native),
// so 10 already costs ~100 ms per hash on a small server core.
export const BCRYPT_COST = 10;

export class PasswordTooLongError extends RangeError {
  constructor(bytes: number) {
    super(`password is ${bytes} bytes in UTF-8; bcrypt uses at most ${BCRYPT_MAX_BYTES} and would silently ignore the rest`);
  }
}

function checkLength(password: string) {
  const bytes = Buffer.byteLength(password, "utf8");
  if (bytes > BCRYPT_MAX_BYTES) throw new PasswordTooLongError(bytes);
}

export async function hashPassword(password: string): Promise<string> {
  checkLength(password);
  return bcrypt.hash(password, BCRYPT_COST);
}

export async function verifyPassword(password: string, hash: string): Promise<boolean> {
  checkLength(password);
  return bcrypt.compare(password, hash);
}

let dummy: Promise<string> | undefined;

/** Spends the same bcrypt work as a real check, so unknown e-mails answer in similar time. */
export async function verifyAgainstDummy(password: string): Promise<false> {
  dummy ??= bcrypt.hash(randomBytes(16).toString("hex"), BCRYPT_COST);
  await bcrypt.compare(password, await dummy);
  return false;
}
