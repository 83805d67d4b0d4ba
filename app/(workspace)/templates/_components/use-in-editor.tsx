"use client";

import { useRouter } from "next/navigation";
import { useId, useState } from "react";

/** Pick a kit, open it in the slab editor with this template applied. */
export function UseInEditor({ templateId, kits }: { templateId: string; kits: { id: string; name: string }[] }) {
  const router = useRouter();
  const id = useId();
  const [kit, setKit] = useState(kits[0]?.id ?? "");
  if (!kits.length) return <p className="text-muted">Make a kit first, then open it in the slab editor with this template.</p>;
  return (
    <form
      className="space-y-2"
      onSubmit={(e) => {
        e.preventDefault();
        router.push(`/kits/${kit}/slab?template=${templateId}`);
      }}
    >
      <label htmlFor={id} className="block text-xs text-muted">
        Kit
      </label>
      <select id={id} className="field-input py-1 text-sm" value={kit} onChange={(e) => setKit(e.target.value)}>
        {kits.map((k) => (
          <option key={k.id} value={k.id}>
            {k.name}
          </option>
        ))}
      </select>
      <button type="submit" className="btn-primary w-full px-3 py-1.5 text-sm">
        Open in the slab editor
      </button>
    </form>
  );
}
