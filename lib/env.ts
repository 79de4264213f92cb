import { z } from "zod";
import { checkTrustedProxies } from "@/lib/auth/client";

/**
 * The process environment, validated once (style: one zod-checked env module instead of
 * `process.env.X!` scattered around). Parsed lazily so that `next build` and unit tests that never
 * touch a service do not need every variable. `scripts/stack.ts` provides all of them locally;
 * production sets the same names (see docker-free-dev.md).
 */
const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().url(),
  AUTH_SECRET: z.string().min(16, "AUTH_SECRET must be at least 16 characters"),
  TOKEN_SECRET: z.string().min(16, "TOKEN_SECRET must be at least 16 characters"),
  APP_URL: z.string().url().default("http://localhost:3000"),
  /** Host names sign-in is honoured under besides APP_URL's (lib/auth/hosts.ts); unset: localhost, 127.0.0.1, [::1]. */
  BANDCROSS_TRUSTED_HOSTS: z.string().optional(),
  /**
   * Reverse proxies whose X-Forwarded-For is believed (lib/auth/client.ts): comma-separated
   * addresses, CIDR ranges or `loopback`, `linklocal`, `uniquelocal`. Unset: none, the TCP peer is the client.
   */
  BANDCROSS_TRUSTED_PROXIES: z
    .string()
    .optional()
    .superRefine((v, ctx) => {
      try {
        checkTrustedProxies(v);
      } catch (e) {
        ctx.addIssue({ code: "custom", message: `not a list of addresses or CIDR ranges (${(e as Error).message})` });
      }
    }),
  S3_ENDPOINT: z.string().url().optional(),
  S3_PUBLIC_ENDPOINT: z.string().url().optional(),
  S3_REGION: z.string().default("us-east-1"),
  S3_BUCKET: z.string().min(3),
  S3_ACCESS_KEY_ID: z.string().min(1),
  S3_SECRET_ACCESS_KEY: z.string().min(1),
  S3_FORCE_PATH_STYLE: z
    .enum(["true", "false"])
    .default("false")
    .transform((v) => v === "true"),
  RESEND_API_KEY: z.string().min(1),
  RESEND_BASE_URL: z.string().url().optional(),
  MAIL_FROM: z.string().min(3).default("Bandcross <alerts@bandcross.local>"),
  MAIL_OUTBOX_DIR: z.string().optional(),
  /** Largest raw file accepted for upload, bytes. */
  UPLOAD_MAX_BYTES: z.coerce.number().int().positive().default(64 * 1024 * 1024),
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

export function env(): Env {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
    throw new Error(`Bandcross cannot start: the environment is incomplete.\n${lines}\n(npm start sets these up locally; see docker-free-dev.md)`);
  }
  cached = parsed.data;
  return cached;
}

