"use client";

import type { ReactNode } from "react";
import { useDisclosure } from "@/features/shell/components/use-disclosure";

/** Menu button for narrow screens; the panel holds the same navigation as the sidebar. */
export function MobileNav({ children }: { children: ReactNode }) {
  const { open, buttonProps, panelProps } = useDisclosure();
  return (
    <>
      <button type="button" {...buttonProps} className="btn-quiet px-2.5 md:hidden" aria-label="Menu">
        <svg viewBox="0 0 20 20" className="size-5" aria-hidden="true">
          {open ? (
            <path d="M5 5l10 10M15 5L5 15" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
          ) : (
            <path d="M3 6h14M3 10h14M3 14h14" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
          )}
        </svg>
      </button>
      <div
        {...panelProps}
        className="absolute inset-x-0 top-full z-40 border-b border-line bg-surface-raised px-4 pt-3 pb-5 shadow-lg md:hidden"
      >
        {children}
      </div>
    </>
  );
}
