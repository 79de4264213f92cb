import { z } from "zod";

/** Body of PUT /api/v1/samples/{id}/watch: `{ watching: boolean }`. */
export const watchBody = z.object({ watching: z.boolean({ error: "watching is true or false." }) }).strict();
