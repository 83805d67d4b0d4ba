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
