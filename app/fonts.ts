import localFont from "next/font/local";

// The UI faces ship in fonts/ (see fonts/README.md); nothing is fetched at build or run time.
export const uiFont = localFont({
  src: [
    { path: "../fonts/DejaVuSans.ttf", weight: "400", style: "normal" },
    { path: "../fonts/DejaVuSans-Bold.ttf", weight: "700", style: "normal" },
  ],
  variable: "--font-ui",
  display: "swap",
});

export const monoFont = localFont({
  src: [{ path: "../fonts/DejaVuSansMono.ttf", weight: "400", style: "normal" }],
  variable: "--font-mono",
  display: "swap",
});
