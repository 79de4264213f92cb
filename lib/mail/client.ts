import "server-only";
import { eq } from "drizzle-orm";
import { Resend } from "resend";
import type { DbOrTx } from "@/db/client";
import { mailLog } from "@/db/schema";
import { env } from "@/lib/env";

let client: Resend | undefined;

function resend(): Resend {
  const e = env();
  client ??= new Resend(e.RESEND_API_KEY, e.RESEND_BASE_URL ? { baseUrl: e.RESEND_BASE_URL } : undefined);
  return client;
}

export interface Mail {
  to: string;
  subject: string;
  html: string;
  text: string;
  /** The same key never sends twice: checked against mail_log and passed to the service as Idempotency-Key. */
  idempotencyKey: string;
  labId?: string | null;
  headers?: Record<string, string>;
}

export type SendResult = { sent: true; id: string | null } | { sent: false; reason: "duplicate" };

/**
 * Sends one e-mail through the resend SDK (the real service in production, the local fake in
 * development). The SDK never throws; its `{ error }` is checked and turned into an exception so a
 * queued job retries. A message whose key is already in mail_log is not sent again.
 */
export async function sendMail(db: DbOrTx, mail: Mail): Promise<SendResult> {
  const [already] = await db.select({ id: mailLog.id }).from(mailLog).where(eq(mailLog.idempotencyKey, mail.idempotencyKey));
  if (already) return { sent: false, reason: "duplicate" };
  const { data, error } = await resend().emails.send(
    { from: env().MAIL_FROM, to: mail.to, subject: mail.subject, html: mail.html, text: mail.text, headers: mail.headers },
    { idempotencyKey: mail.idempotencyKey },
  );
  if (error) {
    const where = error.statusCode == null ? " (the mail service could not be reached)" : ` (status ${error.statusCode})`;
    throw new Error(`E-mail to ${mail.to} was not sent: ${error.message}${where}`);
  }
  await db
    .insert(mailLog)
    .values({ labId: mail.labId ?? null, idempotencyKey: mail.idempotencyKey, to: mail.to, subject: mail.subject, providerId: data?.id ?? null })
    .onConflictDoNothing();
  return { sent: true, id: data?.id ?? null };
}
