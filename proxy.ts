import { type NextRequest, NextResponse } from "next/server";

/**
 * A fresh Content-Security-Policy for every page, with a per-request nonce instead of
 * 'unsafe-inline' for scripts. Next.js reads the nonce from the policy on the request while it renders
 * and puts it on its own scripts (so pages are rendered per request: see app/layout.tsx); the same
 * policy goes out on the response. The proxy never decides access: every page, action and route
 * handler calls its guard itself (lib/auth/guards.ts).
 *
 * What the policy still allows: the geometry kernel's WebAssembly ('wasm-unsafe-eval'), its Web
 * Worker (same origin or blob:), the 3D view's canvas and blob: textures, and inline styles (React
 * style attributes; styles cannot run code). 'strict-dynamic' lets a nonced script load the chunks it
 * needs. Development also needs 'unsafe-eval' (React's dev tooling). API answers get their own
 * policies (next.config.mjs and the thumbnail route), so this proxy does not run for /api.
 */
export function proxy(request: NextRequest) {
  const nonce = Buffer.from(crypto.getRandomValues(new Uint8Array(18))).toString("base64");
  const policy = pagePolicy(nonce, process.env.NODE_ENV === "development");
  const headers = new Headers(request.headers);
  headers.set("x-nonce", nonce);
  headers.set("Content-Security-Policy", policy);
  const response = NextResponse.next({ request: { headers } });
  response.headers.set("Content-Security-Policy", policy);
  return response;
}

export function pagePolicy(nonce: string, dev: boolean): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic' 'wasm-unsafe-eval'${dev ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    `connect-src 'self'${dev ? " ws: wss:" : ""}`,
    "worker-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}

export const config = {
  matcher: [
    {
      // Pages only: not the API, Next's static files or the favicon; not link prefetches either.
      source: "/((?!api/|_next/static|_next/image|favicon\\.svg).*)",
      missing: [
        { type: "header", key: "next-router-prefetch" },
        { type: "header", key: "purpose", value: "prefetch" },
      ],
    },
  ],
};
