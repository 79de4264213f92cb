import { z } from "zod";

/** Body of POST /api/v1/samples/{id}/crossing/confirm: `{ crossingId? }`, the crossing the analyst reviewed (409 if the fit changed since). An empty body is allowed. */
export const confirmBody = z.object({ crossingId: z.string().uuid("crossingId must be a crossing id.").optional() }).strict();
