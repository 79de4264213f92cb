/**
 * The browser's client for Bandcross's own HTTP API: session cookie auth, the lab named in a
 * header, and the API's JSON errors turned into exceptions with their code and message.
 */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly body?: { error?: { fields?: Record<string, string[]>; details?: Record<string, unknown> } },
  ) {
    super(message);
  }
}

export async function api<T>(lab: string, method: string, path: string, body?: unknown): Promise<T> {
  const res = await fetch(`/api/v1${path}`, {
    method,
    headers: { "x-bandcross-lab": lab, ...(body !== undefined ? { "content-type": "application/json" } : {}) },
    body: body !== undefined ? JSON.stringify(body) : undefined,
  });
  const text = await res.text();
  let json: unknown = null;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    throw new ApiError(res.status, "bad_response", `The server answered ${res.status} without JSON.`);
  }
  if (!res.ok) {
    const e = (json as { error?: { code?: string; message?: string } } | null)?.error;
    throw new ApiError(res.status, e?.code ?? "error", e?.message ?? `Request failed (${res.status}).`, json as never);
  }
  return json as T;
}
