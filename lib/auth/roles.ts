import type { Role } from "@/db/schema";

export const ROLE_LABELS: Record<Role, string> = {
  admin: "Admin",
  lead: "Lead",
  programmer: "Programmer",
  operator: "Operator",
};

/** Who may do what; every data-access function names one of these. */
export const PERMISSIONS = {
  readMachines: ["admin", "lead", "programmer", "operator"],
  manageMachines: ["admin"],
  manageUsers: ["admin"],
  readAudit: ["admin", "lead"],
  /** Parts, programs, revisions, analyses, signatures, downloads, compare, a program's audit events. */
  readPrograms: ["admin", "lead", "programmer", "operator"],
  /** Create and edit parts and programs, upload revisions, submit them for review. */
  writePrograms: ["programmer"],
  /** Release or reject a submitted revision (never one's own upload). */
  reviewRevisions: ["lead"],
  /** Delete a draft: the uploader (a programmer) or an admin; the DAL checks the ownership. */
  deleteDrafts: ["programmer", "admin"],
  /** Create, list and revoke one's own API tokens. */
  manageOwnTokens: ["programmer"],
  /** The mail outbox and each message's state. */
  readOutbox: ["admin"],
  /** Work offset values set at the machines. */
  readWorkOffsets: ["admin", "lead", "programmer", "operator"],
  setWorkOffsets: ["admin", "lead", "operator"],
  /** The record of runs signed off at the machines. */
  readRuns: ["admin", "lead", "programmer", "operator"],
  /**
   * Sign off a released revision at the machine before cycle start (password again). Operators, and leads, who often
   * run the first part of a new job themselves; not programmers (the one who wrote it does not also pass it at the
   * machine) and not admins (they keep the system, not the machines).
   */
  signOffRuns: ["operator", "lead"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}
