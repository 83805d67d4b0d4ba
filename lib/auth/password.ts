import bcrypt from "bcryptjs";

/** bcrypt cost 12: about 0.2 s per check in pure JS here, slow enough to blunt guessing. */
const COST = 12;

export async function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, COST);
}

export async function verifyPassword(password: string, hash: string | null | undefined): Promise<boolean> {
  if (!hash) return false;
  return bcrypt.compare(password, hash);
}

// Made when the module loads, so not even the first unknown address takes longer than the rest.
const standIn: Promise<string> = bcrypt.hash(`stand-in ${Math.random()}`, COST);

/**
 * Check a password for sign-in. With no hash to check against (no such account, or one that only
 * signs in by e-mailed link) the password is still compared with a stand-in hash of the same cost,
 * so a wrong guess takes as long for an unknown address as for a known one.
 */
export async function checkPassword(password: string, hash: string | null | undefined): Promise<boolean> {
  if (hash) return bcrypt.compare(password, hash);
  await bcrypt.compare(password, await standIn);
  return false;
}
