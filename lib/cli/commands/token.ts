/**
 * bandcross token create --lab SLUG [--email EMAIL] [--name NAME]
 * Run on the server: talks to the database directly and prints a new API token for a member of the
 * lab (by default its first owner). The token is on the last line of the output.
 */
import type { Command } from "../io";
import { CliUsageError } from "../io";
import { createOptions, haveDatabase } from "../server-env";

const usage = `usage: bandcross token create --lab SLUG [--email EMAIL] [--name NAME]
  --lab SLUG      the lab's slug (the demo lab's is "demo")
  --email EMAIL   the member the token acts as (default: the lab's first owner)
  --name NAME     a label shown in lab settings (default "command line")
Needs DATABASE_URL, or the local stack's .data/env.local (written by npm start).`;

const OPTIONS = {
  lab: { type: "string" },
  email: { type: "string" },
  name: { type: "string" },
  help: { type: "boolean", short: "h" },
} as const;

export const token: Command = {
  name: "token",
  summary: "create an API token for a lab member (run on the server)",
  usage,
  async run(argv, io) {
    const values = createOptions("token", argv, OPTIONS, usage, io);
    if (!values) return 0;
    const lab = values.lab as string | undefined;
    if (!lab) throw new CliUsageError("--lab is required");
    if (!haveDatabase("token", io)) return 1;
    const [{ createTokenForLab }, { systemContext, closeSystemContext }] = await Promise.all([import("../../services/tokens/createTokenForLab"), import("../../services/system")]);
    try {
      const made = await createTokenForLab({ ctx: systemContext("token command"), input: { labSlug: lab, email: values.email as string | undefined, name: values.name as string | undefined } });
      io.err(`token "${made.row.name}" for ${made.member.email} (${made.member.role}) in lab ${made.lab.slug}; it is shown once:\n`);
      io.out(`${made.token}\n`);
      return 0;
    } catch (e) {
      const code = (e as { code?: string }).code;
      io.err(`bandcross token: ${code === "not_found" ? (e as Error).message : `could not create the token: ${(e as Error).message}`}\n`);
      return 1;
    } finally {
      await closeSystemContext();
    }
  },
};
