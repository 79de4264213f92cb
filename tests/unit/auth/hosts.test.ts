import { describe, expect, it } from "vitest";
import { isTrustedHost, requestHost, trustedHosts } from "@/lib/auth/hosts";

describe("trusted host names for sign-in", () => {
  it("trusts the local names on any port and the public address when nothing is set", () => {
    const trusted = trustedHosts(undefined, "https://lab.example.org");
    for (const host of ["localhost:3000", "127.0.0.1:4600", "[::1]:3000", "LOCALHOST", "lab.example.org"]) expect(isTrustedHost(host, trusted), host).toBe(true);
    for (const host of ["lab.example.org.evil.example", "10.0.0.5:3000", "", "evil.example/localhost", "user@localhost"]) expect(isTrustedHost(host, trusted), host).toBe(false);
  });

  it("takes the setting instead of the local names, with ports where given", () => {
    const trusted = trustedHosts(" sts.lab.internal , 192.168.1.20:3000 ", "https://lab.example.org");
    expect(isTrustedHost("sts.lab.internal:8443", trusted)).toBe(true);
    expect(isTrustedHost("192.168.1.20:3000", trusted)).toBe(true);
    expect(isTrustedHost("192.168.1.20:3001", trusted)).toBe(false);
    expect(isTrustedHost("localhost:3000", trusted)).toBe(false);
    expect(isTrustedHost("lab.example.org", trusted)).toBe(true);
  });

  it("reads the proxy's forwarded host first, else Host", () => {
    expect(requestHost(new Headers({ host: "127.0.0.1:3000", "x-forwarded-host": "lab.example.org, inner" }))).toBe("lab.example.org");
    expect(requestHost(new Headers({ host: "127.0.0.1:3000" }))).toBe("127.0.0.1:3000");
  });
});
