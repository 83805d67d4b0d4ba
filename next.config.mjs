/** @type {import('next').NextConfig} */
const nextConfig = {
  // The kernel's WASM loader must stay a real Node module on the server (webpack breaks it).
  serverExternalPackages: ["manifold-3d"],
  poweredByHeader: false,
  reactStrictMode: true,
};

export default nextConfig;
