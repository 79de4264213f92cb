/**
 * `bandcross` — the command line. A dispatcher: the first argument names a subcommand from
 * commands/index.ts; each subcommand lives in its own file and returns its exit status.
 *
 * Exit status: what the subcommand returns (analyze/sweep: 0 when every file was read, 1 when any was
 * rejected); 2 for a usage error. Errors are printed as one human-readable line, never a stack trace.
 */
import { commands } from "./commands";
import { CliUsageError, type Io } from "./io";

function usage(): string {
  const lines = ["usage: bandcross <command> [options]", "", "commands:"];
  for (const c of Object.values(commands)) lines.push(`  ${c.name.padEnd(10)} ${c.summary}`);
  lines.push("", "Run `bandcross <command> --help` for a command's options.");
  return lines.join("\n");
}

export async function run(argv: string[], io: Io): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === "help" || name === "--help" || name === "-h") {
    io.out(usage() + "\n");
    return name ? 0 : 2;
  }
  const cmd = commands[name];
  if (!cmd) {
    io.err(`bandcross: unknown command "${name}"\n\n${usage()}\n`);
    return 2;
  }
  try {
    return await cmd.run(rest, io);
  } catch (e) {
    if (e instanceof CliUsageError) {
      io.err(`bandcross ${name}: ${e.message}\n${cmd.usage}\n`);
      return 2;
    }
    io.err(`bandcross ${name}: ${(e as Error)?.message ?? String(e)}\n`);
    return 2;
  }
}

// A reader that goes away early (`| head`) is not an error worth a stack trace.
for (const stream of [process.stdout, process.stderr])
  stream.on("error", (e: NodeJS.ErrnoException) => {
    if (e.code === "EPIPE") process.exit(process.exitCode ?? 0);
    throw e;
  });

const io: Io = {
  out: (s) => void process.stdout.write(s),
  err: (s) => void process.stderr.write(s),
};

run(process.argv.slice(2), io).then(
  (code) => {
    process.exitCode = code;
  },
  (e) => {
    process.stderr.write(`bandcross: ${(e as Error)?.message ?? String(e)}\n`);
    process.exitCode = 2;
  },
);
