import { z } from "zod";
import { QUALITY_FLAG_CODES } from "@/lib/spectra/edges/flags";
import { ASSUMED_BARRIER_SIGMA_EV } from "@/lib/spectra/settings";
import { numberInput } from "./number";
import { text } from "./text";

/** File names as the browser or the command line sends them: a base name, no folders or control characters. */
const fileName = z
  .string()
  .trim()
  .min(1, "A file needs a name.")
  .max(255, "File names are at most 255 characters.")
  .refine((n) => !/[\u0000-\u001f\u007f]/.test(n), "File names cannot contain control characters.")
  .transform((n) => n.split(/[\\/]/).filter(Boolean).pop() ?? n);

export const createUploadsInput = z.object({
  sessionId: z.string().uuid("sessionId must be a session id."),
  files: z
    .array(
      z.object({
        name: fileName,
        size: z.number().int("size is a whole number of bytes.").min(1, "An empty file has nothing to analyse."),
        sha256: z.string().regex(/^[0-9a-f]{64}$/i, "sha256 must be 64 hexadecimal characters.").transform((s) => s.toLowerCase()),
      }),
    )
    .min(1, "Send at least one file.")
    .max(500, "At most 500 files per request; send the rest in another."),
});
export type CreateUploadsInput = z.infer<typeof createUploadsInput>;

/** A number field's own schema: every refusal of a non-number names the unit it is read in. */
const num = (unit: string) => z.number({ error: `must be a number (in ${unit})` });

export const tagPatch = z
  .object({
    region: text().trim().max(80).nullable().optional(),
    setpointBias_V: numberInput(num("V").refine((v) => v !== 0, "The setpoint bias cannot be zero.").nullable().optional()),
    setpointCurrent_A: numberInput(num("A").positive("The setpoint current is positive (in A, e.g. 1e-10 for 100 pA).").max(1e-6, "Above 1 µA is not a tunnelling setpoint.").nullable().optional()),
    zOffset_pm: numberInput(num("pm").min(-2000, "A z offset beyond ±2000 pm is not a tunnelling change.").max(2000, "A z offset beyond ±2000 pm is not a tunnelling change.").nullable().optional()),
    tipId: z.string().uuid().nullable().optional(),
  })
  .refine((p) => Object.keys(p).length > 0, "Change at least one field.");

export const tagSpectraInput = z.object({
  ids: z.array(z.string().uuid()).min(1).max(5000),
  patch: tagPatch,
});

export const spectraQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
  sort: z.enum(["index", "file", "region", "setpointCurrent", "zOffset", "gap", "field"]).default("index"),
  dir: z.enum(["asc", "desc"]).default("asc"),
  q: text().trim().max(120).optional(),
  region: text().trim().max(80).optional(),
  /** `flagged` (any quality flag), `unflagged`, or one flag's code. */
  flag: z.enum(["flagged", "unflagged", ...QUALITY_FLAG_CODES], { error: `flag is one of flagged, unflagged, ${QUALITY_FLAG_CODES.join(", ")}` }).optional(),
});
export type SpectraQuery = z.infer<typeof spectraQuery>;

export const fieldModelInput = z.object({
  contactDistance_nm: numberInput(num("nm").min(0, "The contact distance cannot be negative.").max(1, "A contact distance above 1 nm is not a tunnel junction.")),
  contactDistanceSigma_nm: numberInput(num("nm").min(0, "An uncertainty cannot be negative.").max(0.5, "An uncertainty above 0.5 nm is larger than the junction.").default(0.05)),
  /**
   * "mean-work-function", "measured" (then barrierHeight_eV is the measured apparent barrier) or
   * "curves": κ from the sample's I(z) curves, those of one session (curveSessionId), one tip
   * (curveTipId) or a chosen set (curveIds), by curveScope.
   */
  decayConstantSource: z.enum(["mean-work-function", "measured", "curves"]).default("mean-work-function"),
  curveScope: z.enum(["session", "tip", "set"]).optional(),
  curveSessionId: z.string().uuid("Choose a session.").optional(),
  curveTipId: z.string().uuid("Choose a tip.").optional(),
  curveIds: z.array(z.string().uuid("Curve ids are ids of I(z) curves.")).max(1000).optional(),
  barrierHeight_eV: numberInput(num("eV").min(0.1, "An apparent barrier below 0.1 eV is not a tunnel barrier.").max(10, "An apparent barrier above 10 eV is not physical.").nullable().optional()),
  /** With κ from the work functions' mean: that assumption's σ, eV (lib/spectra/settings.ts). */
  assumedBarrierSigma_eV: numberInput(
    num("eV").min(0, "An uncertainty cannot be negative.").max(5, "An uncertainty above 5 eV is larger than the barrier.")
      .default(ASSUMED_BARRIER_SIGMA_EV),
  ),
  screening: numberInput(num("a factor").min(1, "A screening factor below 1 would amplify the field.").max(100, "A screening factor above 100 leaves no field.").default(1)),
  note: text().trim().max(500).optional(),
})
  .refine((m) => m.decayConstantSource !== "measured" || m.barrierHeight_eV != null, { message: "Give the measured apparent barrier height.", path: ["barrierHeight_eV"] })
  .refine((m) => m.decayConstantSource !== "curves" || m.curveScope != null, { message: "Choose which I(z) curves: a session's, a tip's or a set.", path: ["curveScope"] })
  .refine((m) => m.decayConstantSource !== "curves" || m.curveScope !== "session" || m.curveSessionId != null, { message: "Choose the session.", path: ["curveSessionId"] })
  .refine((m) => m.decayConstantSource !== "curves" || m.curveScope !== "tip" || m.curveTipId != null, { message: "Choose the tip.", path: ["curveTipId"] })
  .refine((m) => m.decayConstantSource !== "curves" || m.curveScope !== "set" || (m.curveIds?.length ?? 0) > 0, { message: "Choose at least one curve.", path: ["curveIds"] });

/** Spectra to average (repeats at one point, in the order given), and members the user put back. */
export const averageSpectraInput = z.object({
  ids: z.array(z.string().uuid()).min(2, "Select two spectra or more to average.").max(256),
  include: z.array(z.string().uuid()).max(256).optional(),
});

/** An average and one of its members left out, to put back into it. */
export const putBackMemberInput = z.object({ memberId: z.string().uuid() });
