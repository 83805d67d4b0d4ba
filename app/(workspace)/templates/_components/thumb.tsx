/** A template version's top view (SVG drawn by our own worker from numbers only), or what to expect. */
export function TemplateThumb({ svg, state, name, large = false }: { svg: string | null; state: string; name: string; large?: boolean }) {
  const box = large ? "h-56" : "h-36";
  if (state === "done" && svg) {
    return (
      <div
        className={`${box} flex items-center justify-center rounded-card bg-paper [&>svg]:h-full [&>svg]:w-auto`}
        data-testid="template-thumb"
        aria-label={`Top view of ${name}`}
        dangerouslySetInnerHTML={{ __html: svg }}
      />
    );
  }
  return (
    <div
      className={`${box} flex items-center justify-center rounded-card bg-paper px-4 text-center text-xs text-muted`}
      data-testid="template-thumb-pending"
    >
      {state === "failed"
        ? "The sample slab could not be built: see the findings."
        : "Drawing the top view… (a worker builds it with the sample values)"}
    </div>
  );
}
