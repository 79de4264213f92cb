import "server-only";
import { headers } from "next/headers";
import { env } from "@/lib/env";
import { isTrustedHost, requestHost, trustedHosts } from "./hosts";

export type HostCheck = { trusted: true } | { trusted: false; host: string; appUrl: string };

/** Whether this request came by a host name sign-in is honoured under (see hosts.ts). */
export async function checkRequestHost(): Promise<HostCheck> {
  const { APP_URL, BANDCROSS_TRUSTED_HOSTS } = env();
  const host = requestHost(await headers());
  if (isTrustedHost(host, trustedHosts(BANDCROSS_TRUSTED_HOSTS, APP_URL))) return { trusted: true };
  return { trusted: false, host, appUrl: APP_URL };
}

/** The words shown on the sign-in page and returned by the sign-in action for an untrusted host. */
export function untrustedHostMessage(check: { host: string; appUrl: string }): string {
  const name = check.host || "an address without a host name";
  return `This page was reached as ${name}, which is not one of the addresses this Bandcross server signs people in at. Open ${check.appUrl} instead, or ask whoever runs the server to add this name to BANDCROSS_TRUSTED_HOSTS.`;
}
