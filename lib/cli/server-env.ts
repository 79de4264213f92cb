/** For the commands that run on the server (`token`, `lab`): the database address, from the environment or the local stack. */
import fs from "node:fs";
import path from "node:path";
import type { Io } from "./io";

/**
 * True when DATABASE_URL is set, or could be read from the local stack's .data/env.local (written
 * by npm start; what the environment sets already is kept); otherwise says so on stderr.
 */
export function haveDatabase(command: string, io: Io): boolean {
  const local = path.join(process.cwd(), ".data", "env.local");
  // Node's own reader (KEY=value, quoted or not).
  if (!process.env.DATABASE_URL && fs.existsSync(local)) process.loadEnvFile(local);
  if (process.env.DATABASE_URL) return true;
  io.err(`bandcross ${command}: DATABASE_URL is not set and .data/env.local was not found (start the stack with npm start first)\n`);
  return false;
}
