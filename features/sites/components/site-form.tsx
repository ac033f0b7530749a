"use client";

import Link from "next/link";
import { useActionState } from "react";
import { Field, FormMessage, TextArea } from "@/lib/ui/field";
import type { Site, SiteField, SiteFormState } from "@/features/sites/schemas";

type Props = {
  action: (prev: SiteFormState, formData: FormData) => Promise<SiteFormState>;
  /** Present when creating: the group the new site belongs to. */
  groupId?: number;
  site?: Site;
  submitLabel: string;
  cancelHref: string;
};

function initialValue(site: Site | undefined, field: SiteField): string {
  const v = site?.[field];
  return v === undefined || v === null ? "" : String(v);
}

/** Create/edit form for a site; errors appear beside their fields. */
export function SiteForm({ action, groupId, site, submitLabel, cancelHref }: Props) {
  const [state, formAction, pending] = useActionState(action, { ok: true });
  const err = (f: SiteField) => state.fieldErrors?.[f];
  // After a failed submit React resets the form; what was typed comes back from the action.
  const val = (f: SiteField) => state.values?.[f] ?? initialValue(site, f);
  const num = { type: "text", inputMode: "decimal", autoComplete: "off" } as const;

  return (
    <form action={formAction} noValidate className="space-y-8">
      {groupId !== undefined ? <input type="hidden" name="groupId" value={groupId} /> : null}
      {!state.ok && state.message ? <FormMessage tone="error">{state.message}</FormMessage> : null}

      <fieldset className="space-y-4">
        <legend className="mb-2 text-sm font-semibold tracking-wide text-ink-muted uppercase">Site</legend>
        <Field
          name="name"
          label="Name"
          required
          maxLength={120}
          defaultValue={val("name")}
          errors={err("name")}
        />
        <div className="grid gap-4 sm:grid-cols-3">
          <Field
            name="latitude"
            label="Latitude"
            unit="°N"
            hint="−90 to 90; south is negative"
            {...num}
            defaultValue={val("latitude")}
            errors={err("latitude")}
          />
          <Field
            name="longitude"
            label="Longitude"
            unit="°E"
            hint="−180 to 180; west is negative"
            {...num}
            defaultValue={val("longitude")}
            errors={err("longitude")}
          />
          <Field
            name="elevationM"
            label="Elevation"
            unit="m"
            hint="above sea level"
            {...num}
            defaultValue={val("elevationM")}
            errors={err("elevationM")}
          />
        </div>
      </fieldset>

      <fieldset className="space-y-4">
        <legend className="mb-2 text-sm font-semibold tracking-wide text-ink-muted uppercase">Heights</legend>
        <div className="grid gap-4 sm:grid-cols-3">
          <Field
            name="measurementHeightM"
            label="Measurement height"
            unit="m"
            hint="sonic anemometer above ground"
            {...num}
            defaultValue={val("measurementHeightM")}
            errors={err("measurementHeightM")}
          />
          <Field
            name="canopyHeightM"
            label="Canopy height"
            unit="m"
            hint="0 for bare soil or short grass"
            {...num}
            defaultValue={val("canopyHeightM")}
            errors={err("canopyHeightM")}
          />
          <Field
            name="displacementHeightM"
            label="Displacement height (optional)"
            unit="m"
            hint="leave empty to estimate from the canopy"
            {...num}
            defaultValue={val("displacementHeightM")}
            errors={err("displacementHeightM")}
          />
        </div>
      </fieldset>

      <fieldset className="space-y-4">
        <legend className="mb-2 text-sm font-semibold tracking-wide text-ink-muted uppercase">
          Data clock
        </legend>
        <div className="sm:w-1/3">
          <Field
            name="utcOffsetHours"
            label="UTC offset of the logger"
            unit="h"
            hint="standard time, no daylight saving; e.g. 1, −5, 5.75"
            {...num}
            defaultValue={val("utcOffsetHours")}
            errors={err("utcOffsetHours")}
          />
        </div>
        <TextArea
          name="notes"
          label="Notes (optional)"
          maxLength={4000}
          defaultValue={val("notes")}
          errors={err("notes")}
        />
      </fieldset>

      <div className="flex items-center gap-3 border-t border-line pt-6">
        <button type="submit" className="btn-primary" disabled={pending}>
          {pending ? "Saving…" : submitLabel}
        </button>
        <Link href={cancelHref} className="btn-quiet">
          Cancel
        </Link>
      </div>
    </form>
  );
}
