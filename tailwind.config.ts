import type { Config } from "tailwindcss";

/**
 * Slabwright's design tokens, the one place they live (see ../shared/design.md).
 * Colours are CSS variables so dark mode can swap paper and graphite while keeping the accent;
 * the variables themselves are set in app/globals.css.
 */
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./lib/ui/**/*.{ts,tsx}"],
  darkMode: "media",
  theme: {
    extend: {
      colors: {
        paper: "var(--sw-paper)",
        surface: "var(--sw-surface)",
        ink: "var(--sw-ink)",
        muted: "var(--sw-muted)",
        hairline: "var(--sw-hairline)",
        accent: { DEFAULT: "#6d4aff", hover: "#5a38f0", soft: "var(--sw-accent-soft)" },
        finding: { error: "var(--sw-finding-error)", warning: "var(--sw-finding-warning)", info: "var(--sw-finding-info)" },
        slab: { top: "#efe8dc", piece: "#4a4f57" },
      },
      fontFamily: {
        sans: ["var(--font-ui)", "system-ui", "sans-serif"],
        mono: ["var(--font-mono)", "ui-monospace", "monospace"],
      },
      // Type scale 12/14/16/20/24/32 px.
      fontSize: {
        xs: ["0.75rem", { lineHeight: "1rem" }],
        sm: ["0.875rem", { lineHeight: "1.25rem" }],
        base: ["1rem", { lineHeight: "1.5rem" }],
        lg: ["1.25rem", { lineHeight: "1.75rem" }],
        xl: ["1.5rem", { lineHeight: "2rem" }],
        "2xl": ["2rem", { lineHeight: "2.5rem" }],
      },
      borderRadius: { card: "10px" },
      maxWidth: { column: "72rem" },
    },
  },
};

export default config;
