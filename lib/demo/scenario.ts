/*
 * The demo scenario: an invented research group, site and people. Nothing here describes
 * a real tower, place or person; all evening data for it is synthetic.
 */
import type { Role } from "@/lib/auth/roles";

/** The password of every demo account (stated in the README). */
export const DEMO_PASSWORD = "gloaming-demo";

export const DEMO_GROUP_NAME = "Demo scenario: Ridgeback Forest Group";

export const DEMO_ACCOUNTS: ReadonlyArray<{ email: string; displayName: string; role: Role }> = [
  { email: "lead@demo.gloaming.test", displayName: "Demo Lead (invented)", role: "lead" },
  { email: "analyst@demo.gloaming.test", displayName: "Demo Analyst (invented)", role: "analyst" },
  { email: "viewer@demo.gloaming.test", displayName: "Demo Viewer (invented)", role: "viewer" },
];

/** An invented mid-latitude conifer forest site; coordinates chosen at random, not a real tower. */
export const DEMO_SITE = {
  name: "Demo: Hollow Pine Tower",
  latitude: 46.9021,
  longitude: 7.6413,
  elevation_m: 780,
  measurement_height_m: 32,
  canopy_height_m: 21,
  displacement_height_m: null,
  utc_offset_hours: 1,
  notes: "Demo scenario: an invented site. Its data is synthetic and describes no real tower.",
} as const;
