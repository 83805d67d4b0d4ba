import { handlers } from "@/lib/auth/config";

export const runtime = "nodejs";
export const { GET, POST } = handlers;
