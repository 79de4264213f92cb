import type { ReactNode } from "react";
import { pageSample } from "@/lib/actions/validated";

/**
 * Above the sample pages' loading state: a sample that is absent, in another lab or not shared
 * with this collaborator is a 404 response, decided before the page's frame streams (the read is
 * shared with the page, pageSample).
 */
export default async function SampleLayout({
  children,
  params,
}: {
  children: ReactNode;
  params: Promise<{ lab: string; sampleId: string }>;
}) {
  const { lab, sampleId } = await params;
  await pageSample(lab, sampleId);
  return children;
}
