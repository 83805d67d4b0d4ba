/**
 * Runs once when a server starts: production refuses to start without its secrets (lib/env.ts),
 * rather than failing on the first sign-in or accepting webhook events signed with nothing.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { env, requireStartupSecrets } = await import("@/lib/env");
  try {
    requireStartupSecrets(env());
  } catch (err) {
    console.error(`✕ ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  }
}
