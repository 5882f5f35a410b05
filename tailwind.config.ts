import type { Config } from "tailwindcss";

// Our own palette: slate surfaces, a teal accent for actions, amber for cautions.
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        accent: {
          50: "#effcf9",
          100: "#c9f4ea",
          500: "#14a38b",
          600: "#0e8572",
          700: "#0f6a5c",
        },
        caution: {
          50: "#fff8eb",
          500: "#d98a04",
          700: "#93590a",
        },
        danger: {
          50: "#fff1f1",
          600: "#c42b2b",
          700: "#9f1f1f",
        },
      },
      fontFamily: {
        sans: ["var(--font-inter)", "ui-sans-serif", "system-ui", "sans-serif"],
      },
    },
  },
};

export default config;
