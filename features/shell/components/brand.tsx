import Link from "next/link";

/** Wordmark: a half-set sun on the horizon between a dusk sky and an afterglow band. */
export function Brand({ href = "/" }: { href?: string }) {
  return (
    <Link
      href={href}
      className="inline-flex items-center gap-2.5 rounded-md font-semibold tracking-tight text-ink"
    >
      {/* Solid fills only: a gradient id would clash between the sidebar and the mobile bar. */}
      <svg viewBox="0 0 32 32" className="size-7" aria-hidden="true">
        <rect width="32" height="32" rx="8" fill="#474b87" />
        <path d="M0 21h32v3a8 8 0 0 1-8 8H8a8 8 0 0 1-8-8Z" fill="#d08a1e" />
        <path d="M8.5 21a7.5 7.5 0 0 1 15 0Z" fill="#fff4dc" />
        <path d="M4 21h24M10 26h12" stroke="#1c1d36" strokeWidth="1.6" strokeLinecap="round" />
      </svg>
      <span className="text-lg">Gloaming</span>
    </Link>
  );
}
