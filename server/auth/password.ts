import argon2 from 'argon2';

/** argon2id with the library's defaults (64 MiB, t=3, p=4): ~130 ms here. */
export function hashPassword(password: string): Promise<string> {
  return argon2.hash(password, { type: argon2.argon2id });
}

export async function verifyPassword(hash: string, password: string): Promise<boolean> {
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false;
  }
}

// Verifying against a real hash when the account does not exist keeps the time of a failed
// sign-in the same for unknown e-mails and wrong passwords.
let dummyHash: Promise<string> | undefined;
export async function burnPasswordCheck(password: string): Promise<void> {
  dummyHash ??= hashPassword('comoving-no-such-account-' + Math.random());
  await verifyPassword(await dummyHash, password);
}
