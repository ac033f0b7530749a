import { reviewedInputSchema } from "@/features/review/schemas";
import { eveningMutationRoute } from "@/features/review/server/mutation-route";
import { markReviewed } from "@/features/review/server/mutations";

// POST /api/evenings/:eveningId/reviewed - mark the evening reviewed (analyst, lead); body { version }
export const POST = eveningMutationRoute(reviewedInputSchema, markReviewed);
