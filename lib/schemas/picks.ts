import { z } from "zod";

const reason = z.string().trim().min(3, "Say why, in a few words (kept in the pick's history).").max(500, "At most 500 characters.");
const version = z.coerce.number().int().min(1);

export const correctPickInput = z
  .object({
    vbEdge_V: z.coerce.number().finite(),
    cbEdge_V: z.coerce.number().finite(),
    reason,
    version,
  })
  .refine((p) => p.cbEdge_V > p.vbEdge_V, { message: "The conduction-band edge must lie above the valence-band edge.", path: ["cbEdge_V"] });

export const excludeInput = z.object({ excluded: z.boolean(), reason, version });
export const undoInput = z.object({ version });
