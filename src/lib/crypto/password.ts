import { hash, verify } from '@node-rs/argon2';

// argon2id (the library's default algorithm) with OWASP's minimum recommended cost: 19 MiB, 2 passes, 1 lane.
const options = { memoryCost: 19456, timeCost: 2, outputLen: 32, parallelism: 1 };

export { MIN_PASSWORD_LENGTH } from '../constants';

export function hashPassword(password: string): Promise<string> {
  return hash(password, options);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password, options);
  } catch {
    return false;
  }
}

// A hash to verify against when the e-mail is unknown, so a wrong e-mail costs the same time as a wrong password.
let dummy: Promise<string> | null = null;
export async function burnPasswordCheck(password: string): Promise<void> {
  dummy ??= hashPassword('not-a-real-password-' + Math.random());
  await verifyPassword(await dummy, password);
}
