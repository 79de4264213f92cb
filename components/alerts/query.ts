/** Query keys and fetchers of the alerts components (GET endpoints of /api/v1; the lab travels as ?lab=). */
export const alertKeys = {
  watch: (sampleId: string) => ["sample", sampleId, "watch"] as const,
  timeline: (sampleId: string) => ["sample", sampleId, "crossing-events"] as const,
};

export async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error(body?.error?.message ?? `The server answered ${res.status}.`);
  return body as T;
}
