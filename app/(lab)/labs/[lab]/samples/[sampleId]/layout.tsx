import type { ReactNode } from "react";
import { orNotFound, pageCtx } from "@/lib/actions/validated";
import { getSample } from "@/lib/services/samples/getSample";

/**
 * Above the sample pages' loading state: a sample that is absent, in another lab or not shared
 * with this collaborator is a 404 response, decided before the page's frame streams (one indexed
 * read; the page reads the sample again with the rest of its data).
 */
export default async function SampleLayout({ children, params }: { children: ReactNode; params: Promise<{ lab: string; sampleId: string }> }) {
  const { lab, sampleId } = await params;
  await orNotFound(getSample({ ctx: await pageCtx(lab), input: { id: sampleId } }));
  return children;
}
