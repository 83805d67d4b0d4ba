import type { Role } from "@/db/schema";

/**
 * Who may do what in a workspace: the one table every guard reads.
 *
 * | action | owner | designer | operator | viewer |
 * | view parts, kits, templates, plates, plate maps | ✓ | ✓ | ✓ | ✓ |
 * | upload/delete parts; edit kits and templates | ✓ | ✓ | | |
 * | make a plate (from any kit/template) | ✓ | ✓ | reprints | |
 * | download plate files | ✓ | ✓ | ✓ | |
 * | record inspections | ✓ | ✓ | ✓ | |
 * | members, invitations, API keys, billing, audit | ✓ | | | |
 */
export const PERMISSIONS = {
  "workspace:view": ["owner", "designer", "operator", "viewer"],
  "parts:write": ["owner", "designer"],
  "kits:write": ["owner", "designer"],
  "templates:write": ["owner", "designer"],
  "plates:make": ["owner", "designer"],
  "plates:reprint": ["owner", "designer", "operator"],
  "plates:download": ["owner", "designer", "operator"],
  "inspections:record": ["owner", "designer", "operator"],
  "members:manage": ["owner"],
  "invitations:manage": ["owner"],
  "api-keys:manage": ["owner"],
  "billing:manage": ["owner"],
  "audit:view": ["owner"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

export const ROLES: Role[] = ["owner", "designer", "operator", "viewer"];

export const ROLE_LABEL: Record<Role, string> = {
  owner: "Owner — everything, including people, keys and billing",
  designer: "Designer — parts, kits, templates and plates",
  operator: "Operator — prints, inspects and reprints",
  viewer: "Viewer — can look, not change",
};
