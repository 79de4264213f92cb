/** Output channels and the command interface shared by every subcommand. */
export interface Io {
  out(text: string): void;
  err(text: string): void;
}

export interface Command {
  name: string;
  summary: string;
  usage: string;
  /** Returns the exit status. */
  run(argv: string[], io: Io): Promise<number>;
}

/** A mistake in the command line itself (exit status 2, usage shown). */
export class CliUsageError extends Error {}
