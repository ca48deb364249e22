import bcrypt from "bcryptjs";

/**
 * Cost 12 keeps a hash around 200 ms here: slow for guessing, fine for sign-in. Every stored hash
 * and the dummy one use it, so an unknown e-mail, a wrong password and a demo account all take the
 * same time (OWASP Authentication Cheat Sheet, "Authentication Responses": no enumeration by timing).
 */
export const BCRYPT_COST = 12;

export function hashPasswordSync(password: string): string {
  return bcrypt.hashSync(password, BCRYPT_COST);
}

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

/** True for a hash made at a lower cost than the common one. */
export function needsRehash(hash: string): boolean {
  return bcrypt.getRounds(hash) < BCRYPT_COST;
}
