/**
 * Runs once when a server starts: production refuses to start without its secrets (lib/env.ts),
 * rather than failing on the first sign-in or accepting webhook events it cannot verify.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { exitWithoutStartupSecrets } = await import("@/lib/env");
  exitWithoutStartupSecrets();
}
