import Link from "next/link";

/** Our mark: a rounded slab seen from above with three pieces standing on it. */
export function BrandMark({ size = 28 }: { size?: number }) {
  return (
    <svg width={size} height={size} viewBox="0 0 32 32" aria-hidden="true">
      <rect x="2" y="6" width="28" height="20" rx="6" fill="#efe8dc" stroke="#1f2328" strokeWidth="1.5" />
      <circle cx="10" cy="16" r="3.5" fill="#4a4f57" />
      <rect x="16" y="11" width="6" height="5" rx="1" fill="#4a4f57" />
      <rect x="16" y="18" width="9" height="3" rx="1" fill="#6d4aff" />
    </svg>
  );
}

export function Brand({ href = "/" }: { href?: string }) {
  return (
    <Link href={href} className="flex items-center gap-2 text-lg font-bold tracking-tight">
      <BrandMark />
      <span>Slabwright</span>
    </Link>
  );
}
