import { z } from "zod";
import { numberInput } from "./number";
import { text } from "./text";

const reason = text().trim().min(3, "Say why, in a few words (kept in the pick's history).").max(500, "At most 500 characters.");
const version = numberInput(z.number({ error: "must be the version number the pick was read at" }).int("must be a whole number").min(1, "must be 1 or more"));
const edge = numberInput(z.number({ error: "must be a bias in V" }));

export const correctPickInput = z
  .object({
    vbEdge_V: edge,
    cbEdge_V: edge,
    reason,
    version,
  })
  .refine((p) => p.cbEdge_V > p.vbEdge_V, { message: "The conduction-band edge must lie above the valence-band edge.", path: ["cbEdge_V"] });

export const excludeInput = z.object({ excluded: z.boolean(), reason, version });
export const undoInput = z.object({ version });
export const acceptInput = z.object({ version });
