/** Body of POST /api/v1/samples and PATCH /api/v1/samples/{id}: the lab's sample schema. */
export { sampleInput as createSampleBody, samplePatch as patchSampleBody } from "@/lib/schemas/lab";
