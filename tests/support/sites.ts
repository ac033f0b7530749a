/**
 * The fields of an invented tower set-up, as the site form and the sites API take them. Heights
 * are plausible for a temperate forest (common practice); the site is synthetic.
 */
export function syntheticSiteFields(name: string) {
  return {
    name,
    latitude: 46.1,
    longitude: 7.4,
    elevationM: 820,
    measurementHeightM: 32,
    canopyHeightM: 24,
    displacementHeightM: 16,
    utcOffsetHours: 1,
    notes: "synthetic test site",
  };
}
