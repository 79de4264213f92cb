/**
 * For the commands that run on the server (`token`, `lab`): the database address, from the
 * environment or the local stack, and their one action's options.
 */
import fs from "node:fs";
import path from "node:path";
import type { ParseArgsConfig } from "node:util";
import { CliUsageError, type Io } from "./io";
import { parse, type ParsedArgs } from "./shared";

/**
 * True when DATABASE_URL is set, or could be read from the local stack's .data/env.local (written
 * by npm start; what the environment sets already is kept); otherwise says so on stderr.
 */
export function haveDatabase(command: string, io: Io): boolean {
  const local = path.join(process.cwd(), ".data", "env.local");
  // Node's own reader (KEY=value, quoted or not).
  if (!process.env.DATABASE_URL && fs.existsSync(local)) process.loadEnvFile(local);
  if (process.env.DATABASE_URL) return true;
  io.err(
    `bandcross ${command}: DATABASE_URL is not set and .data/env.local was not found ` +
      "(start the stack with npm start first)\n",
  );
  return false;
}

/**
 * `bandcross <command> create [options]`: the options of the one action these commands know, or
 * `null` when help was asked for (and printed). Anything else is a usage error.
 */
export function createOptions(
  command: string,
  argv: string[],
  options: NonNullable<ParseArgsConfig["options"]>,
  usage: string,
  io: Io,
): ParsedArgs["values"] | null {
  const [verb, ...rest] = argv;
  if (verb !== "--help" && verb !== "-h") {
    if (verb !== "create")
      throw new CliUsageError(verb ? `unknown ${command} action "${verb}"` : `say what to do: ${command} create`);
    const { values } = parse(rest, options);
    if (!values.help) return values;
  }
  io.out(usage + "\n");
  return null;
}
