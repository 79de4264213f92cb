/** Body of POST /api/v1/tips. */
export { tipInput as createTipBody } from "@/lib/schemas/lab";
