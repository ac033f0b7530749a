import Link from "next/link";

/** Wordmark: a sun half below a horizon line, in the dusk ramp. */
export function Brand({ href = "/" }: { href?: string }) {
  return (
    <Link
      href={href}
      className="inline-flex items-center gap-2.5 rounded-md font-semibold tracking-tight text-ink"
    >
      <svg viewBox="0 0 32 32" className="size-7" aria-hidden="true">
        <defs>
          <linearGradient id="gloaming-sky" x1="0" y1="0" x2="0" y2="1">
            <stop offset="0" stopColor="#474b87" />
            <stop offset="1" stopColor="#d08a1e" />
          </linearGradient>
        </defs>
        <rect width="32" height="32" rx="8" fill="url(#gloaming-sky)" />
        <path d="M8 21a8 8 0 0 1 16 0Z" fill="#fff4dc" />
        <path d="M5 21.5h22M9 25h14" stroke="#1c1d36" strokeWidth="1.6" strokeLinecap="round" />
      </svg>
      <span className="text-lg">Gloaming</span>
    </Link>
  );
}
