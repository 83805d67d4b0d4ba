import type { Role } from "@/db/schema";

/**
 * Where each role's work is, and so where it lands after signing in or joining: the operator at the
 * print floor, the designer at the kits, the owner at the workspace overview, a viewer at the plates.
 */
export const LANDING: Record<Role, string> = {
  owner: "/overview",
  designer: "/kits",
  operator: "/floor",
  viewer: "/plates",
};

/** The path every sign-in and join goes to when no other page was asked for; it sends each role on to its landing page. */
export const HOME = "/home";
