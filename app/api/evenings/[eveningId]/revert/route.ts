import { revertInputSchema } from "@/features/review/schemas";
import { eveningMutationRoute } from "@/features/review/server/mutation-route";
import { revertEvening } from "@/features/review/server/mutations";

// POST /api/evenings/:eveningId/revert - return to the automatic label (lead); body { version, note? }
export const POST = eveningMutationRoute(revertInputSchema, revertEvening);
