import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { formatEnvFile, loadOrCreateSecrets, stackEnv } from "@/scripts/stack/env";

describe("stack environment", () => {
  it("generates secrets once and keeps them", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "bx-secrets-"));
    try {
      const first = loadOrCreateSecrets(dir);
      expect(first.AUTH_SECRET.length).toBeGreaterThanOrEqual(32);
      expect(first.TOKEN_SECRET).not.toBe(first.AUTH_SECRET);
      expect(loadOrCreateSecrets(dir)).toEqual(first);
      expect(fs.statSync(path.join(dir, "secrets.json")).mode & 0o077).toBe(0);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it("builds the contract the app validates", () => {
    const secrets = {
      AUTH_SECRET: "a",
      TOKEN_SECRET: "t",
      PG_PASSWORD: "p",
      S3_ACCESS_KEY_ID: "S3RVER",
      S3_SECRET_ACCESS_KEY: "S3RVER",
    };
    const env = stackEnv({ dataDir: "/x/.data", ports: { pg: 1, s3: 2, mail: 3, app: 4 }, secrets, nodeEnv: "test" });
    expect(env.DATABASE_URL).toBe("postgres://bandcross:p@127.0.0.1:1/bandcross");
    expect(env.AUTH_URL).toBe("http://localhost:4");
    expect(env.S3_ENDPOINT).toBe("http://127.0.0.1:2");
    expect(env.RESEND_BASE_URL).toBe("http://127.0.0.1:3");
    expect(env.MAIL_OUTBOX_DIR).toBe("/x/.data/mail");
    expect(env.PORT).toBe("4");
  });

  it("writes an env file that quotes values with spaces", () => {
    const text = formatEnvFile({ A: "plain", MAIL_FROM: "Bandcross <alerts@bandcross.local>" }, "header");
    expect(text).toBe("# header\nA=plain\nMAIL_FROM='Bandcross <alerts@bandcross.local>'\n");
  });
});
