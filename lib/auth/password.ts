import bcrypt from "bcryptjs";

/** bcrypt with cost 11 (about 0.1 s here): slow enough to resist guessing, fast enough for sign-in. */
const COST = 11;

let dummyHash: string | undefined;

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, COST);
}

export async function verifyPassword(password: string, hash: string | null | undefined): Promise<boolean> {
  // Compare against a throwaway hash when the user has none, so an unknown e-mail takes as long as a wrong password.
  dummyHash ??= bcrypt.hashSync("no-such-user-password", COST);
  const ok = await bcrypt.compare(password, hash ?? dummyHash);
  return ok && Boolean(hash);
}
