/** Body of POST /api/v1/uploads: `{ sessionId, files: [{ name, size, sha256 }] }`. */
export { createUploadsInput as createUploadsBody } from "@/lib/schemas/uploads";
