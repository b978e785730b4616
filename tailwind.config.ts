import type { Config } from "tailwindcss";

// Sigmaflow's palette: deep "ink" blues for structure, a "flux" teal accent, "ember" for warnings.
export default {
  content: ["./index.html", "./src/**/*.{ts,tsx}"],
  theme: {
    extend: {
      fontFamily: {
        sans: ['"Inter Variable"', "system-ui", "sans-serif"],
        mono: ['"IBM Plex Mono"', "ui-monospace", "monospace"],
      },
      colors: {
        ink: {
          50: "#f3f6fb",
          100: "#e3e9f4",
          200: "#c5d1e6",
          300: "#9aaed1",
          400: "#6a84b5",
          500: "#48639a",
          600: "#364d7f",
          700: "#2c3e67",
          800: "#223052",
          900: "#17203a",
          950: "#0d1324",
        },
        flux: {
          50: "#edfcf8",
          100: "#d2f7ee",
          200: "#a8eedd",
          300: "#6fdfc7",
          400: "#38c7ac",
          500: "#17ab92",
          600: "#0d8a77",
          700: "#0e6e61",
          800: "#10574e",
          900: "#114841",
        },
        ember: {
          50: "#fff6ed",
          100: "#ffead4",
          400: "#fb8c3c",
          500: "#f26d16",
          600: "#d9530c",
          700: "#b43d0d",
        },
      },
    },
  },
} satisfies Config;
