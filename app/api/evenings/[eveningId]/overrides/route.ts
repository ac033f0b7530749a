import { overrideInputSchema } from "@/features/review/schemas";
import { eveningMutationRoute } from "@/features/review/server/mutation-route";
import { overrideEvening } from "@/features/review/server/mutations";

// POST /api/evenings/:eveningId/overrides - set a person's label with a required note (analyst, lead); body { label, note, version }
export const POST = eveningMutationRoute(overrideInputSchema, overrideEvening);
