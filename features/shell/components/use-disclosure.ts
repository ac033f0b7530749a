"use client";

import { usePathname } from "next/navigation";
import { useEffect, useId, useRef, useState } from "react";

/**
 * Open/closed state for a menu button and its panel: closes on Escape (focus back to the
 * button), on a click outside, and when the route changes.
 */
export function useDisclosure<B extends HTMLElement = HTMLButtonElement>() {
  const [open, setOpen] = useState(false);
  const buttonRef = useRef<B>(null);
  const panelRef = useRef<HTMLDivElement>(null);
  const panelId = useId();
  const pathname = usePathname();
  const [seenPath, setSeenPath] = useState(pathname);

  if (seenPath !== pathname) {
    setSeenPath(pathname);
    setOpen(false);
  }

  useEffect(() => {
    if (!open) return;
    function onKey(e: KeyboardEvent) {
      if (e.key === "Escape") {
        setOpen(false);
        buttonRef.current?.focus();
      }
    }
    function onPointer(e: PointerEvent) {
      const t = e.target as Node;
      if (!panelRef.current?.contains(t) && !buttonRef.current?.contains(t)) setOpen(false);
    }
    document.addEventListener("keydown", onKey);
    document.addEventListener("pointerdown", onPointer);
    return () => {
      document.removeEventListener("keydown", onKey);
      document.removeEventListener("pointerdown", onPointer);
    };
  }, [open]);

  return {
    open,
    setOpen,
    buttonProps: {
      ref: buttonRef,
      "aria-expanded": open,
      "aria-controls": panelId,
      onClick: () => setOpen((o) => !o),
    },
    panelProps: { ref: panelRef, id: panelId, hidden: !open },
  };
}
