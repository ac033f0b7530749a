import type { Config } from "tailwindcss";

// Label palette of our own: distinguishable for common colour-vision deficiencies,
// always paired with a letter glyph in the UI (never colour alone).
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./features/**/*.{ts,tsx}"],
  darkMode: "media",
  theme: {
    extend: {
      fontFamily: {
        sans: ["var(--font-sans)", "system-ui", "sans-serif"],
        mono: ["var(--font-mono)", "ui-monospace", "monospace"],
      },
      colors: {
        dusk: {
          50: "#f5f6fb",
          100: "#e8eaf5",
          200: "#cdd2ea",
          300: "#a5acd6",
          400: "#7a82bd",
          500: "#5a60a3",
          600: "#474b87",
          700: "#3a3d6d",
          800: "#2c2e52",
          900: "#1c1d36",
          950: "#111222",
        },
        // Hues follow the Okabe-Ito idea (bluish green, orange, blue, grey) and differ in
        // lightness too, so they stay apart under deuteranopia and protanopia; each fill
        // meets 4.5:1 against its glyph colour (white, or dusk-950 on orange).
        label: {
          local: "#1f7a5c",
          stagnant: "#d08a1e",
          advective: "#2f63b8",
          unclassified: "#6b6b78",
        },
      },
    },
  },
};

export default config;
