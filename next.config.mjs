/**
 * Security headers on every response. The Content-Security-Policy is not among them:
 * - pages get theirs from proxy.ts, with a fresh nonce for every request (no 'unsafe-inline' for
 *   scripts);
 * - API answers get a deny-all policy below (nothing in a JSON body, a download or a PDF should run),
 *   except the part thumbnail, which sets its own sandboxed policy and must keep it alone;
 * - Next's static files (scripts, the kernel's Web Worker and its WASM) get none.
 */
const securityHeaders = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Permissions-Policy", value: "camera=(self), microphone=(), geolocation=()" },
  ...(process.env.AUTH_URL?.startsWith("https://")
    ? [{ key: "Strict-Transport-Security", value: "max-age=31536000; includeSubDomains" }]
    : []),
];

/** @type {import('next').NextConfig} */
const nextConfig = {
  // The kernel's WASM loader must stay a real Node module on the server (webpack breaks it).
  serverExternalPackages: ["manifold-3d"],
  poweredByHeader: false,
  reactStrictMode: true,
  async headers() {
    return [
      { source: "/:path*", headers: securityHeaders },
      // Every API path but /api/parts/{id}/thumbnail (its route sends its own policy).
      {
        source: "/api/:path((?!parts/[^/]+/thumbnail$).*)",
        headers: [{ key: "Content-Security-Policy", value: "default-src 'none'; frame-ancestors 'none'" }],
      },
    ];
  },
};

export default nextConfig;
