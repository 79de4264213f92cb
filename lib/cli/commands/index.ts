/** Subcommand registry: add a command by importing it and listing it here. */
import type { Command } from "../io";
import { analyze } from "./analyze";
import { barrier } from "./barrier";
import { lab } from "./lab";
import { push } from "./push";
import { sweep } from "./sweep";
import { token } from "./token";

export const commands: Record<string, Command> = {
  [analyze.name]: analyze,
  [sweep.name]: sweep,
  [barrier.name]: barrier,
  [push.name]: push,
  [token.name]: token,
  [lab.name]: lab,
};
