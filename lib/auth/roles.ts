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
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}
