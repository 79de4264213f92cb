import { z } from "zod";
import { numberInput } from "@/lib/schemas/number";

/**
 * Body of POST /api/v1/samples/{id}/crossing/confirm: `{ crossingId?, field_V_per_nm? }`, the
 * crossing the analyst reviewed and the critical field they saw (409, naming the current value,
 * if the fit changed since). An empty body is allowed.
 */
export const confirmBody = z
  .object({
    crossingId: z.string().uuid("crossingId must be a crossing id.").optional(),
    field_V_per_nm: numberInput(z.number({ error: "field_V_per_nm must be a number (V/nm)" }).optional()),
  })
  .strict();
