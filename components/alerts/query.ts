import { queryKeys } from "@/lib/query-keys";

/** Query keys and fetchers of the alerts components (GET endpoints of /api/v1; the lab travels as ?lab=). */
export const alertKeys = {
  // In the sample's key family (queryKeys.sample), so a finished job refreshes them with the rest.
  watch: (sampleId: string) => [...queryKeys.sample(sampleId), "watch"] as const,
  timeline: (sampleId: string) => [...queryKeys.sample(sampleId), "crossing-events"] as const,
};

export async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error(body?.error?.message ?? `The server answered ${res.status}.`);
  return body as T;
}
