import { describe, expect, it } from "vitest";
import { contentSecurityPolicy, uploadOrigins } from "@/lib/web/csp";

/** Directive names and keywords as CSP Level 3 (W3C) defines them. */
describe("contentSecurityPolicy", () => {
  it("allows the app's own scripts and this response's nonce, nothing inline or evaluated", () => {
    const csp = contentSecurityPolicy({ nonce: "abc123", connect: ["http://127.0.0.1:9011"] });
    const script = csp.split("; ").find((d) => d.startsWith("script-src "));
    expect(script).toBe("script-src 'self' 'nonce-abc123'");
    expect(csp).toContain("connect-src 'self' http://127.0.0.1:9011");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).not.toContain("upgrade-insecure-requests");
    expect(contentSecurityPolicy({ nonce: "n", connect: [], dev: true })).toContain("'unsafe-eval'");
    expect(contentSecurityPolicy({ nonce: "n", connect: [], https: true })).toContain("upgrade-insecure-requests");
  });

  it("lets the browser reach the raw-file store by the address presigned uploads use", () => {
    // Path style: http://host/bucket/key; virtual-host style: https://bucket.host/key (AWS S3 user guide, "Virtual hosting of buckets").
    const base = { S3_BUCKET: "raw", S3_REGION: "eu-north-1" };
    expect(uploadOrigins({ ...base, S3_ENDPOINT: "http://127.0.0.1:9011", S3_FORCE_PATH_STYLE: true })).toEqual(["http://127.0.0.1:9011"]);
    expect(uploadOrigins({ ...base, S3_ENDPOINT: "http://minio:9000", S3_PUBLIC_ENDPOINT: "https://files.lab.example", S3_FORCE_PATH_STYLE: true })).toEqual(["https://files.lab.example"]);
    expect(uploadOrigins({ ...base, S3_FORCE_PATH_STYLE: false })).toEqual(["https://s3.eu-north-1.amazonaws.com", "https://raw.s3.eu-north-1.amazonaws.com"]);
  });
});
