import type { Config } from "tailwindcss";

// Rillscale's own tokens: warm paper surfaces, graphite text, one muted lichen-green accent and two
// signal colours. Chosen for long reading of dense tables: body text stays above WCAG AA (4.5:1) on
// every surface, and colour never carries meaning alone (status badges also say what they mean).
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: "#fbfaf7", sunk: "#f3f1eb", line: "#e2ded4", edge: "#cfc9bc" },
        graphite: {
          DEFAULT: "#1f2428",
          soft: "#3d454c",
          muted: "#5f6870",
          faint: "#8d959c",
        },
        lichen: {
          wash: "#edf3ee",
          tint: "#d3e4d8",
          DEFAULT: "#3a6f52",
          deep: "#2b5640",
          night: "#1f3f2f",
        },
        rust: { wash: "#faece7", DEFAULT: "#a83f2a", deep: "#86301f" },
        amber: { wash: "#fbf3df", DEFAULT: "#8a5d0e" },
      },
      fontFamily: {
        sans: ["var(--font-sans)", "system-ui", "sans-serif"],
        mono: ["var(--font-mono)", "ui-monospace", "monospace"],
      },
      fontSize: {
        // A 13 px table size keeps many rows on screen while staying legible at Inter's x-height.
        dense: ["0.8125rem", { lineHeight: "1.25rem" }],
      },
      borderRadius: { card: "0.375rem" },
      boxShadow: { card: "0 1px 2px rgba(31, 36, 40, 0.06), 0 1px 1px rgba(31, 36, 40, 0.04)" },
      maxWidth: { console: "88rem" },
    },
  },
  plugins: [],
};

export default config;
