"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";

/** The header's links; the one for the current section is marked (aria-current) and underlined. */
export function NavLinks({ links }: { links: { href: string; label: string }[] }) {
  const path = usePathname();
  const current = (href: string) => (href === "/" ? path === "/" : path === href || path.startsWith(`${href}/`));
  // Revisions belong to Programs.
  const section = (href: string) => current(href) || (href === "/programs" && path.startsWith("/revisions/"));
  return (
    <nav aria-label="Main" className="flex flex-1 flex-wrap gap-1">
      {links.map((l) => (
        <Link
          key={l.href}
          href={l.href}
          aria-current={section(l.href) ? "page" : undefined}
          className="rounded px-3 py-2 text-sm font-medium text-white/85 hover:bg-white/10 hover:text-white aria-[current=page]:bg-white/15 aria-[current=page]:text-white"
        >
          {l.label}
        </Link>
      ))}
    </nav>
  );
}
