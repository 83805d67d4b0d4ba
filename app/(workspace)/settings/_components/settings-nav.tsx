"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";

export function SettingsNav({ items }: { items: { href: string; label: string }[] }) {
  const path = usePathname();
  return (
    <nav aria-label="Settings" className="mb-6 flex flex-wrap gap-2 text-sm">
      {items.map((i) => (
        <Link
          key={i.href}
          href={i.href}
          aria-current={path === i.href ? "page" : undefined}
          className={
            `rounded-card border px-3 py-1 ` +
            `${path === i.href ? "border-accent bg-accent-soft font-bold" : "border-hairline bg-surface hover:border-accent"}`
          }
        >
          {i.label}
        </Link>
      ))}
    </nav>
  );
}
