/** Reads the local mail fake's outbox (GET /emails?to=…), as tests assert on what was sent. */
export interface OutboxMail {
  id: string;
  to: string[] | string;
  from: string;
  subject: string;
  html: string;
  text: string;
}

export async function mailsTo(address: string): Promise<OutboxMail[]> {
  const base = process.env.RESEND_BASE_URL;
  if (!base) throw new Error("RESEND_BASE_URL is not set: run the tests with npm test");
  const res = await fetch(`${base}/emails?to=${encodeURIComponent(address)}&limit=100`);
  if (!res.ok) throw new Error(`mail fake answered ${res.status}`);
  const body = (await res.json()) as { data: OutboxMail[] };
  return body.data;
}

export function linkIn(text: string, pathPrefix: string): string {
  const m = new RegExp(`https?://[^\\s"<]+${pathPrefix.replace(/\//g, "\\/")}[^\\s"<]+`).exec(text);
  if (!m) throw new Error(`no link with ${pathPrefix} in the message`);
  return m[0];
}
