"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";

const sections = [
  { href: "/overview", label: "Overview" },
  { href: "/parts", label: "Parts" },
  { href: "/kits", label: "Kits" },
  { href: "/templates", label: "Templates" },
  { href: "/plates", label: "Plates" },
  { href: "/floor", label: "Floor" },
  { href: "/developers", label: "API" },
  { href: "/settings", label: "Settings" },
];

export function SectionNav() {
  const path = usePathname();
  return (
    <nav aria-label="Sections" className="-mx-4 px-4">
      {/* Wraps onto a second line on a narrow screen rather than hiding sections off its edge. */}
      <ul className="flex flex-wrap gap-x-1 text-sm">
        {sections.map((s) => {
          const active = path === s.href || path.startsWith(`${s.href}/`);
          return (
            <li key={s.href}>
              <Link
                href={s.href}
                aria-current={active ? "page" : undefined}
                className={
                  `block whitespace-nowrap border-b-2 px-2.5 py-2 sm:px-3 ` +
                  `${active ? "border-accent font-bold text-ink" : "border-transparent text-muted hover:text-ink"}`
                }
              >
                {s.label}
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
