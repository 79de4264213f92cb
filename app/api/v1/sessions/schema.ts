/** Body of POST /api/v1/sessions. */
export { sessionInput as createSessionBody } from "@/lib/schemas/lab";
