import type { MemberRole } from "@/db/schema";
import { forbidden } from "./errors";

/**
 * What each lab role may do. Checked on the server for every operation (service functions call
 * `assertCan`); the UI only hides what the server would refuse anyway.
 */
export const PERMISSIONS = {
  "lab:read": ["owner", "microscopist", "analyst", "collaborator"],
  "sample:write": ["owner", "microscopist", "analyst"],
  "tip:write": ["owner", "microscopist"],
  "session:write": ["owner", "microscopist"],
  "upload:write": ["owner", "microscopist"],
  "spectrum:tag": ["owner", "microscopist", "analyst"],
  "analysis:write": ["owner", "analyst"],
  "members:manage": ["owner"],
  "tokens:manage": ["owner"],
  "lab:configure": ["owner"],
  /** A new lab of one's own (its owner from the start): changes nothing in the lab one acts from. */
  "lab:create": ["owner", "microscopist", "analyst", "collaborator"],
} as const satisfies Record<string, readonly MemberRole[]>;

export type Permission = keyof typeof PERMISSIONS;

export const ROLES: readonly MemberRole[] = ["owner", "microscopist", "analyst", "collaborator"];

export const ROLE_LABEL: Record<MemberRole, string> = {
  owner: "Owner",
  microscopist: "Microscopist",
  analyst: "Analyst",
  collaborator: "Collaborator",
};

export const ROLE_SUMMARY: Record<MemberRole, string> = {
  owner: "Everything, including members, tokens and lab defaults.",
  microscopist: "Samples, tips, sessions, uploads and tagging.",
  analyst: "Samples, extraction settings, field models, pick corrections and crossings.",
  collaborator: "Reads everything they are shown; changes nothing.",
};

export function can(role: MemberRole, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly MemberRole[]).includes(role);
}

export function assertCan(actor: { role: MemberRole }, permission: Permission): void {
  if (!can(actor.role, permission)) throw forbidden();
}
