import { importSvgLogo } from "@/lib/geometry/marks/logo";
import type { SlabOptionsInput } from "@/lib/geometry/options";
import type { TemplateVariableInput } from "@/lib/geometry/template";

/**
 * The starter templates Slabwright ships: our own wording and look, shared by every workspace
 * (read-only; duplicate one to make it yours). Keys are stable so the seed can find them again.
 */
export type Starter = { key: string; name: string; description: string; options: SlabOptionsInput; variables: TemplateVariableInput[] };

export const STARTERS: Starter[] = [
  {
    key: "round-thanks",
    name: "Round thank-you slab",
    description:
      "A disc under the set with a thank-you line for the customer and the kit's name. Numbers and outline rings show a missing " +
      "piece at a glance.",
    options: {
      slab: { shape: "disc", thickness: 1, gap: 0.2, margin: 5 },
      marks: {
        text: [
          { value: "Thank you, {customer}!", size: 5, maxWidth: 90 },
          { value: "{kit}", size: 3.5, font: "sans-bold" },
        ],
        numbers: true,
        outlines: "ring",
      },
    },
    variables: [{ name: "customer", label: "Customer's first name", default: "friend", sample: "Sam" }],
  },
  {
    key: "numbered-set",
    name: "Numbered set with outlines",
    description: "A rounded slab for counting: every piece numbered with a ring around it, the kit's name and the day it was printed.",
    options: {
      slab: { shape: "rounded-rect", cornerRadius: 6, margin: 4 },
      marks: { text: [{ value: "{kit} · {date}", size: 4, font: "mono-bold" }], numbers: true, outlines: "ring" },
    },
    variables: [],
  },
  {
    key: "order-label",
    name: "Order label with QR",
    description: "The order number in large type and a QR code that opens the order, for packing and for the customer.",
    options: {
      slab: { shape: "rounded-rect", cornerRadius: 5 },
      marks: {
        text: [
          { value: "ORDER {order}", size: 6, maxWidth: 80 },
          { value: "{customer}", size: 4, maxWidth: 80 },
        ],
        qr: { value: "https://shop.example/o/{order}", module: 1, level: "M", maxSize: 40 },
        numbers: true,
        outlines: "ring",
      },
    },
    variables: [
      { name: "order", label: "Order number", default: "", sample: "10482" },
      { name: "customer", label: "Customer", default: "", sample: "Sam Okafor" },
    ],
  },
];

/** The demo shop's own mark (invented for the demo): a sail over two waves, drawn with basic shapes. */
export const DEMO_LOGO_SVG = `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 60 40">
  <title>Marrowby mark</title>
  <path d="M30 2 L30 26 L12 26 Z"/>
  <path d="M33 8 L33 26 L46 26 Z"/>
  <path fill-rule="evenodd" d="M4 30 Q15 36 30 30 Q45 24 56 30 L56 34 Q45 28 30 34 Q15 40 4 34 Z"/>
</svg>`;

export function demoTemplate(): Starter {
  const logo = importSvgLogo(DEMO_LOGO_SVG);
  return {
    key: "demo-marrowby",
    name: "Marrowby thank-you",
    description: "Our shop's slab: the sail mark, the order number and a thank-you for the customer.",
    options: {
      slab: { shape: "rounded-rect", cornerRadius: 6 },
      marks: {
        text: [
          { value: "ORDER {order}", size: 5 },
          { value: "Thank you, {customer}!", size: 4, maxWidth: 70 },
        ],
        logo: { name: "Marrowby mark", ...logo, width: 16, relief: "engrave", depth: 0.4 },
        numbers: true,
        outlines: "ring",
      },
    },
    variables: [
      { name: "order", label: "Order number", default: "", sample: "10482" },
      { name: "customer", label: "Customer", default: "friend", sample: "Sam" },
    ],
  };
}
