import { z } from "zod";
import { numberInput } from "./number";
import { text } from "./text";

/**
 * Inputs for samples, tips, sessions and members: one schema each, used by the browser forms, the
 * server actions and the HTTP API alike. Numbers go through `numberInput`: forms send text, scripts
 * send JSON, and neither a blank nor a `null` may turn into 0.
 * Work-function bounds: every elemental metal and common 2D film lies within 2–7 eV
 * (CRC Handbook, 2008, work functions of the elements); an uncertainty above 1 eV is a typo.
 */
const optionalText = (max: number) =>
  text()
    .trim()
    .max(max, `At most ${max} characters.`)
    .optional()
    .transform((v) => (v ? v : undefined));

const workFunction = numberInput(
  z
    .number({ error: "Enter a number in eV." })
    .min(2, "A work function below 2 eV is not physical for a tip or film.")
    .max(7, "A work function above 7 eV is not physical for a tip or film."),
);
const workFunctionSigma = numberInput(
  z
    .number({ error: "Enter a number in eV." })
    .min(0, "An uncertainty cannot be negative.")
    .max(1, "An uncertainty above 1 eV is almost certainly a typo."),
);

const isoDate = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "Use the form YYYY-MM-DD.");

export const sampleInput = z.object({
  name: text().trim().min(1, "Give the sample a name.").max(120, "At most 120 characters."),
  material: text().trim().min(1, "Name the material, e.g. germanene.").max(120, "At most 120 characters."),
  substrate: optionalText(120),
  workFunction_eV: workFunction,
  workFunctionSigma_eV: workFunctionSigma,
  notes: optionalText(4000),
});
export type SampleInput = z.infer<typeof sampleInput>;
export const samplePatch = sampleInput.partial();

export const tipInput = z.object({
  label: text().trim().min(1, "Give the tip a label.").max(80, "At most 80 characters."),
  material: text().trim().min(1, "Name the tip material, e.g. W or PtIr.").max(80, "At most 80 characters."),
  workFunction_eV: workFunction,
  workFunctionSigma_eV: workFunctionSigma,
  preparedOn: isoDate.optional().or(z.literal("").transform(() => undefined)),
  notes: optionalText(4000),
});
export type TipInput = z.infer<typeof tipInput>;

export const sessionInput = z.object({
  sampleId: z.string().uuid("Choose a sample."),
  tipId: z
    .string()
    .uuid("Choose a tip.")
    .optional()
    .or(z.literal("").transform(() => undefined)),
  label: text().trim().min(1, "Give the session a label.").max(120, "At most 120 characters."),
  date: isoDate,
  instrument: optionalText(120),
  temperature_K: numberInput(
    z
      .number({ error: "Enter a temperature in kelvin." })
      .positive("Temperature is in kelvin and must be above zero.")
      .max(400, "Above 400 K is outside what this instrument model covers.")
      .optional(),
  ),
  notes: optionalText(4000),
});
export type SessionInput = z.infer<typeof sessionInput>;

export const memberRoleSchema = z.enum(["owner", "microscopist", "analyst", "collaborator"], {
  error: "Choose one of owner, microscopist, analyst or collaborator.",
});

export const inviteInput = z.object({
  email: text().trim().toLowerCase().email("Enter an e-mail address."),
  role: memberRoleSchema,
});

export const passwordSchema = text()
  .min(10, "Use at least 10 characters.")
  .max(200, "At most 200 characters.");

export const labDefaultsInput = z.object({
  name: text().trim().min(1, "Give the lab a name.").max(120),
  defaultTipWorkFunction_eV: workFunction,
  defaultTipWorkFunctionSigma_eV: workFunctionSigma,
  defaultSampleWorkFunction_eV: workFunction,
  defaultSampleWorkFunctionSigma_eV: workFunctionSigma,
});

/** The demo lab's slug: no other lab may take it, so "an own lab" is exactly a lab with another slug. */
export const DEMO_LAB_SLUG = "demo";

/** A lab's address in `/labs/<slug>`: 3–40 lowercase letters, digits and single hyphens, from a letter. */
export const labSlug = z
  .string()
  .trim()
  .toLowerCase()
  .min(3, "Use at least 3 characters.")
  .max(40, "At most 40 characters.")
  .regex(/^[a-z][a-z0-9]*(-[a-z0-9]+)*$/, "Use lowercase letters, digits and single hyphens, starting with a letter.")
  .refine((s) => s !== DEMO_LAB_SLUG, `"${DEMO_LAB_SLUG}" is kept for the demo lab; choose another.`);

/** A slug made from a lab's name (accents dropped, other characters to hyphens), for forms that leave it blank. */
export function slugFromName(name: string): string {
  const s = name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^[^a-z]+|-+$/g, "")
    .slice(0, 40)
    .replace(/-+$/, "");
  return s.length >= 3 && s !== DEMO_LAB_SLUG ? s : `lab-${s}`.replace(/-+$/, "").padEnd(3, "0");
}

/**
 * What a new lab's forms start from: the `labs` table's column defaults (db/schema/auth.ts), 4.5 eV
 * for tip and sample alike (polycrystalline W is 4.32–4.55 eV, CRC Handbook, from memory) with 0.1 eV.
 */
export const NEW_LAB_DEFAULTS = {
  defaultTipWorkFunction_eV: 4.5,
  defaultTipWorkFunctionSigma_eV: 0.1,
  defaultSampleWorkFunction_eV: 4.5,
  defaultSampleWorkFunctionSigma_eV: 0.1,
} as const;

/** A new lab: its name, its slug (blank: made from the name) and the defaults of its tips and samples. */
export const newLabInput = labDefaultsInput.extend({
  slug: z.preprocess((v) => (typeof v === "string" && v.trim() === "" ? undefined : v), labSlug.optional()),
});
export type NewLabInput = z.infer<typeof newLabInput>;

/** `/setup`: the group's first own lab and its first owner, guarded by the setup code of the start log. */
export const setupInput = newLabInput.extend({
  code: text().trim().min(1, "Enter the setup code from the start log."),
  ownerName: text().trim().min(1, "Tell us your name.").max(120, "At most 120 characters."),
  email: text().trim().toLowerCase().email("Enter an e-mail address."),
  password: passwordSchema,
});

/** `bandcross lab create`: a lab made on the server for an owner who is invited by a link. */
export const labForOwnerInput = newLabInput.extend({
  ownerEmail: text().trim().toLowerCase().email("Enter the owner's e-mail address."),
});

/** The lab's setting for spectra whose automatic pick carries a quality flag, in the critical-field fit. */
export const flaggedInFitInput = z.object({
  flaggedInFit: z.enum(["include", "exclude"], { error: "Choose include or exclude." }),
});

export const tokenInput = z.object({
  name: text().trim().min(1, "Name the token, e.g. 'acquisition PC'.").max(80),
  userId: z
    .string()
    .uuid()
    .optional()
    .or(z.literal("").transform(() => undefined)),
});

export const acceptInviteInput = z.object({
  token: text().min(20),
  name: text().trim().min(1, "Tell us your name.").max(120),
  password: passwordSchema,
});

/** Turn a zod error into `{ field: [messages] }` for forms and 422 bodies. */
export function fieldErrorsOf(error: z.ZodError): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "_form";
    (out[key] ??= []).push(issue.message);
  }
  return out;
}
