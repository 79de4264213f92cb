/** Subcommand registry: add a command by importing it and listing it here. */
import type { Command } from "../io";
import { analyze } from "./analyze";
import { sweep } from "./sweep";

export const commands: Record<string, Command> = {
  [analyze.name]: analyze,
  [sweep.name]: sweep,
};
