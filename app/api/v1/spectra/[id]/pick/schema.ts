/** Body of PATCH /api/v1/spectra/{id}/pick: `{ vbEdge_V, cbEdge_V, reason, version }`. */
export { correctPickInput as correctPickBody } from "@/lib/schemas/picks";
