import { pool } from "@/db";
import { checkHealth } from "@/lib/health";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET() {
  const { httpStatus, body } = await checkHealth(pool());
  return Response.json(body, { status: httpStatus, headers: { "Cache-Control": "no-store" } });
}
