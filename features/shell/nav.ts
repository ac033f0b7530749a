import type { Role } from "@/lib/auth/roles";

/**
 * The shell's navigation. A feature that adds a screen adds one entry here (only once the
 * page exists); `minimumRole` hides entries a role cannot use.
 */
export type NavItem = {
  href: string;
  label: string;
  /** A one- or two-character mark shown beside the label. */
  glyph: string;
  minimumRole?: Role;
};

export const NAV_ITEMS: readonly NavItem[] = [
  { href: "/sites", label: "Sites", glyph: "◎" },
  { href: "/seasons", label: "Seasons", glyph: "◔" },
  { href: "/rules", label: "Rules", glyph: "≡" },
  { href: "/team", label: "Team", glyph: "⚇" },
  { href: "/settings", label: "Settings", glyph: "⚙" },
  { href: "/account", label: "Account", glyph: "◇" },
];
