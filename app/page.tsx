import Link from "next/link";
import { Brand } from "./_components/brand";
import { SlabIllustration } from "./_components/slab-illustration";

const steps = [
  {
    title: "Bring the parts",
    body: "STL, 3MF or OBJ. Each file is checked, welded where safe, and refused with a plain reason when it is not printable.",
  },
  {
    title: "Lay out the slab",
    body:
      "Pieces are packed to fit your bed with even spacing, on a 1 mm slab with rounded corners and a 0.2 mm air gap (one layer, " +
      "so the slicer keeps it).",
  },
  { title: "Mark it", body: "An order number, a thank-you line, a QR code, a number beside every piece and an outline under each one." },
  {
    title: "Print and pack",
    body: "One watertight STL or 3MF, and a plate map the packing bench checks against: an empty outline is a missing piece.",
  },
];

const people = [
  { who: "Designers", what: "tune a kit's slab live in a 3D preview and a to-scale plate map." },
  { who: "Sellers", what: "save a branded thank-you slab once and reuse it on every order." },
  { who: "Order systems", what: "post meshes or name a kit through the API and get the plate file back." },
  { who: "Operators", what: "check each finished slab against its plate map and send missing pieces for reprint." },
];

export default function LandingPage() {
  return (
    <div className="min-h-screen">
      <header className="border-b border-hairline bg-surface">
        <div className="mx-auto flex max-w-column items-center justify-between px-4 py-3">
          <Brand />
          <nav className="flex items-center gap-3 text-sm">
            <Link href="/pricing" className="text-accent underline">
              Plans
            </Link>
            <Link href="/sign-in" className="btn-primary">
              Sign in
            </Link>
          </nav>
        </div>
      </header>

      <main className="mx-auto max-w-column px-4">
        <section className="grid items-center gap-10 py-12 md:grid-cols-2 md:py-20">
          <div>
            <h1 className="text-2xl leading-tight md:text-[2.5rem] md:leading-[3rem]">
              Every kit on one printed slab, every piece accounted for.
            </h1>
            <p className="mt-4 text-base text-muted">
              Slabwright turns a set of part meshes into a print-ready plate: the parts laid out to fit your bed, standing on a thin carrier
              slab across a small air gap so they snap off clean, with engraved order text, a QR code, numbers and outlines. One file out,
              checked against the rules of the trade.
            </p>
            <div className="mt-6 flex flex-wrap gap-3">
              <Link href="/sign-in" className="btn-primary">
                Try the demo workshop
              </Link>
              <a href="#how" className="btn-quiet">
                How it works
              </a>
            </div>
          </div>
          <div className="card p-4">
            <SlabIllustration />
          </div>
        </section>

        <section id="how" className="py-10">
          <h2 className="text-xl">How it works</h2>
          <ol className="mt-6 grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
            {steps.map((s, i) => (
              <li key={s.title} className="card p-4">
                <span className="font-mono text-sm text-accent">{String(i + 1).padStart(2, "0")}</span>
                <h3 className="mt-1 text-base">{s.title}</h3>
                <p className="mt-2 text-sm text-muted">{s.body}</p>
              </li>
            ))}
          </ol>
        </section>

        <section className="py-10">
          <h2 className="text-xl">Who works in it</h2>
          <ul className="mt-6 grid gap-4 sm:grid-cols-2">
            {people.map((p) => (
              <li key={p.who} className="card p-4 text-sm">
                <strong>{p.who}</strong> <span className="text-muted">{p.what}</span>
              </li>
            ))}
          </ul>
        </section>

        <section className="py-10">
          <div className="card border-finding-warning/40 p-4 text-sm">
            <h2 className="text-base">Before you print</h2>
            <ul className="mt-2 list-disc space-y-1 pl-5 text-muted">
              <li>The nozzle (around 190–260 °C) and bed (up to about 110 °C) are hot: let the plate cool before lifting the slab.</li>
              <li>ABS and ASA give off styrene and fine particles: print them in a ventilated room.</li>
              <li>Small parts are a choking hazard: kits for children under 3 must not hold parts that fit the small-parts cylinder.</li>
              <li>Make no food-safe claims. Follow your local regulations and licensed practice.</li>
            </ul>
          </div>
        </section>
      </main>

      <footer className="border-t border-hairline py-6 text-center text-xs text-muted">Slabwright · carrier slabs for printed kits</footer>
    </div>
  );
}
