"use client";

import { useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useRef, useState, useTransition } from "react";
import { FormMessage } from "@/lib/ui/field";
import { sitesKeys } from "@/features/sites/queries";
import type { SiteFormState } from "@/features/sites/schemas";

type Props = { siteId: number; siteName: string; action: (siteId: number) => Promise<SiteFormState> };

/** Delete button with a confirmation dialog (native <dialog>: focus trap and Escape for free). */
export function DeleteSite({ siteId, siteName, action }: Props) {
  const dialog = useRef<HTMLDialogElement>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [pending, startTransition] = useTransition();
  const queryClient = useQueryClient();
  const router = useRouter();

  function confirm() {
    startTransition(async () => {
      const result = await action(siteId);
      if (!result.ok) {
        setMessage(result.message ?? "The site could not be deleted.");
        return;
      }
      await queryClient.invalidateQueries({ queryKey: sitesKeys.all });
      dialog.current?.close();
      router.push("/sites");
      router.refresh();
    });
  }

  return (
    <>
      <button
        type="button"
        className="btn-quiet text-red-700 dark:text-red-300"
        onClick={() => dialog.current?.showModal()}
      >
        Delete site
      </button>
      <dialog
        ref={dialog}
        aria-labelledby="delete-site-title"
        aria-describedby="delete-site-text"
        className="m-auto w-[min(28rem,calc(100vw-2rem))] rounded-xl border border-line bg-surface-raised p-6 text-ink shadow-xl backdrop:bg-dusk-950/50"
      >
        <h2 id="delete-site-title" className="text-lg font-semibold">
          Delete “{siteName}”?
        </h2>
        <p id="delete-site-text" className="mt-2 text-sm text-ink-muted">
          The site and everything recorded for it are removed for the whole group. This cannot be undone.
        </p>
        {message ? (
          <div className="mt-4">
            <FormMessage tone="error">{message}</FormMessage>
          </div>
        ) : null}
        <div className="mt-6 flex justify-end gap-3">
          <button type="button" className="btn-quiet" onClick={() => dialog.current?.close()} autoFocus>
            Keep site
          </button>
          <button type="button" className="btn-danger" onClick={confirm} disabled={pending}>
            {pending ? "Deleting…" : "Delete site"}
          </button>
        </div>
      </dialog>
    </>
  );
}
