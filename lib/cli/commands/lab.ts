/**
 * bandcross lab create --name NAME --owner-email EMAIL [--slug SLUG] [work functions] [--json]
 * Run on the server: talks to the database directly, creates a lab with no members and prints the
 * invitation link its owner opens to join (nothing is mailed). The link is on the last line.
 */
import type { Command } from "../io";
import { CliUsageError } from "../io";
import { createOptions, haveDatabase } from "../server-env";

const usage = `usage: bandcross lab create --name NAME --owner-email EMAIL [--slug SLUG] [--json]
                           [--tip-work-function EV] [--tip-work-function-sigma EV]
                           [--sample-work-function EV] [--sample-work-function-sigma EV]
  --name NAME           the lab's name, e.g. "Surface Physics Group"
  --owner-email EMAIL   who becomes its owner by opening the printed invitation link (valid 7 days)
  --slug SLUG           its address, /labs/SLUG (default: made from the name)
  --tip-work-function, --sample-work-function and their -sigma: the lab's defaults for new tips and
                        samples, in eV (default 4.5 ± 0.1 each)
  --json                print {lab: {id, slug, name, url}, invitation: {email, role, link, expiresAt}}
Needs DATABASE_URL, or the local stack's .data/env.local (written by npm start).`;

const OPTIONS = {
  name: { type: "string" },
  "owner-email": { type: "string" },
  slug: { type: "string" },
  "tip-work-function": { type: "string" },
  "tip-work-function-sigma": { type: "string" },
  "sample-work-function": { type: "string" },
  "sample-work-function-sigma": { type: "string" },
  json: { type: "boolean" },
  help: { type: "boolean", short: "h" },
} as const;

/** The service's field names as the options that set them, for its messages. */
const OPTION_OF: Record<string, string> = {
  name: "--name",
  ownerEmail: "--owner-email",
  slug: "--slug",
  defaultTipWorkFunction_eV: "--tip-work-function",
  defaultTipWorkFunctionSigma_eV: "--tip-work-function-sigma",
  defaultSampleWorkFunction_eV: "--sample-work-function",
  defaultSampleWorkFunctionSigma_eV: "--sample-work-function-sigma",
};

export const lab: Command = {
  name: "lab",
  summary: "create a lab and print its owner's invitation link (run on the server)",
  usage,
  async run(argv, io) {
    const values = createOptions("lab", argv, OPTIONS, usage, io);
    if (!values) return 0;
    if (!values.name) throw new CliUsageError("--name is required");
    if (!values["owner-email"]) throw new CliUsageError("--owner-email is required");
    if (!haveDatabase("lab", io)) return 1;
    const [{ createLabForOwner }, { systemContext, closeSystemContext }, { NEW_LAB_DEFAULTS }] = await Promise.all([
      import("../../services/members/createLabForOwner"),
      import("../../services/system"),
      import("../../schemas/lab"),
    ]);
    // Numbers go to the service as text, checked there like a form's (units and bounds in the messages).
    const input = {
      name: values.name,
      ownerEmail: values["owner-email"],
      slug: values.slug,
      defaultTipWorkFunction_eV: values["tip-work-function"] ?? NEW_LAB_DEFAULTS.defaultTipWorkFunction_eV,
      defaultTipWorkFunctionSigma_eV:
        values["tip-work-function-sigma"] ?? NEW_LAB_DEFAULTS.defaultTipWorkFunctionSigma_eV,
      defaultSampleWorkFunction_eV: values["sample-work-function"] ?? NEW_LAB_DEFAULTS.defaultSampleWorkFunction_eV,
      defaultSampleWorkFunctionSigma_eV:
        values["sample-work-function-sigma"] ?? NEW_LAB_DEFAULTS.defaultSampleWorkFunctionSigma_eV,
    };
    try {
      const made = await createLabForOwner({ ctx: systemContext("lab command"), input });
      const url = `${process.env.APP_URL ?? "http://localhost:3000"}/labs/${made.lab.slug}`;
      if (values.json) {
        const invitation = { ...made.invitation, expiresAt: made.invitation.expiresAt.toISOString() };
        io.out(JSON.stringify({ lab: { ...made.lab, url }, invitation }, null, 2) + "\n");
        return 0;
      }
      io.err(
        `lab "${made.lab.name}" created at ${url}; ${made.invitation.email} becomes its owner by opening ` +
          `this link before ${made.invitation.expiresAt.toISOString().slice(0, 10)} (shown once, not mailed):\n`,
      );
      io.out(`${made.invitation.link}\n`);
      return 0;
    } catch (e) {
      const err = e as Error & { fieldErrors?: Record<string, string[]> };
      if (err.fieldErrors) {
        const lines = Object.entries(err.fieldErrors).map(([k, m]) => `  ${OPTION_OF[k] ?? k}: ${m.join(" ")}`);
        io.err(`bandcross lab: nothing was created:\n${lines.join("\n")}\n`);
      } else io.err(`bandcross lab: could not create the lab: ${err.message}\n`);
      return 1;
    } finally {
      await closeSystemContext();
    }
  },
};
