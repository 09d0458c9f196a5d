// Stillfield design tokens. Components use these names, never raw hex values.
// Calm by default: neutral paper/ink greys for everything normal; colour is spent on
// attention states and on charge polarity only. Every state also has a shape and a word
// (see components/ui/state-badge.tsx), so colour is never the only code.
import type { Config } from "tailwindcss";

const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  darkMode: "class",
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: "#f6f5f1", raised: "#ffffff", sunk: "#ecebe5", line: "#d9d7cf" },
        ink: { DEFAULT: "#23262b", soft: "#4b5058", faint: "#62676f", ghost: "#a9adb3" },
        night: { DEFAULT: "#111417", raised: "#1a1e23", line: "#2c3238", ink: "#e8eaec", soft: "#a7adb4" },
        brand: { DEFAULT: "#35566f", soft: "#dfe7ed", deep: "#213849" },
        // charge polarity: two colour-blind-safe hues, always shown with the sign as well
        pos: { DEFAULT: "#2563a8", soft: "#dce8f6" },
        neg: { DEFAULT: "#276b4e", soft: "#dbefe5" },
        // attention states
        near: { DEFAULT: "#8f5d00", soft: "#fbefd2", bright: "#f2b441" },
        over: { DEFAULT: "#b42318", soft: "#fbe1dd", bright: "#ff6b5b" },
        silent: { DEFAULT: "#5c6169", soft: "#e7e7e4" },
        shelved: { DEFAULT: "#5b4f8a", soft: "#e9e5f5" },
        ok: { DEFAULT: "#4b5058" },
      },
      fontFamily: {
        sans: ["var(--font-sans)", "system-ui", "sans-serif"],
      },
      fontSize: {
        wall: ["4.5rem", { lineHeight: "1" }],
        "wall-sm": ["2rem", { lineHeight: "1.1" }],
      },
      borderRadius: { card: "0.5rem" },
    },
  },
};
export default config;
