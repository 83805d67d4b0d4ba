"use client";

import { useRef, useState } from "react";
import type { PlacedPiece, PlateLayout } from "@/lib/geometry/build-plate";

const path = (contours: [number, number][][]) =>
  contours.map((c) => `M${c.map(([x, y]) => `${x.toFixed(2)} ${y.toFixed(2)}`).join("L")}Z`).join("");

const FOCUS_RING = "outline-none [&:focus-visible>path]:stroke-[#6d4aff] [&:focus-visible>path]:[stroke-width:0.8]";

/**
 * The plate map, to scale (1 unit = 1 mm, y up): the slab, each piece's outline and number. Drag a
 * piece to move it (snapped to 0.5 mm; hold Alt for free moves). From the keyboard: Tab to a piece,
 * arrow keys move it 0.5 mm (Shift: 5 mm), R turns it 15° (Shift+R: 1°). Selection is by kit slot, which
 * stays with the piece; its number follows its place. `readOnly`: pieces can be picked, not moved.
 */
export function PlateMap({
  layout,
  pieces,
  selected,
  flagged,
  onSelect,
  onMove,
  readOnly = false,
  notUpdated = false,
}: {
  layout: PlateLayout;
  pieces: PlacedPiece[];
  /** The selected piece's slot, and the slots of pieces a finding points at. */
  selected?: number;
  flagged: Set<number>;
  onSelect: (slot?: number) => void;
  onMove: (piece: PlacedPiece, dx: number, dy: number, turn?: number) => void;
  readOnly?: boolean;
  /** The map is the last plate that built, not the change now in the form. */
  notUpdated?: boolean;
}) {
  const svg = useRef<SVGSVGElement>(null);
  const [drag, setDrag] = useState<{ piece: PlacedPiece; x0: number; y0: number; dx: number; dy: number } | null>(null);
  const { width: W, depth: D } = layout.slab;
  const size = `${W.toFixed(0)} × ${D.toFixed(0)} mm`;
  const toMm = (e: React.PointerEvent) => {
    const m = svg.current!.getScreenCTM()!.inverse();
    const p = new DOMPoint(e.clientX, e.clientY).matrixTransform(m);
    return { x: p.x, y: D - p.y };
  };
  return (
    <svg
      ref={svg}
      viewBox={`-2 -2 ${W + 4} ${D + 4}`}
      className="h-full w-full touch-none select-none"
      // A group, not an image: its pieces are buttons, and an image may hold nothing interactive.
      role="group"
      aria-label={`Plate map${notUpdated ? " (not updated: the last plate that built)" : ""}: a ${size} slab with ${pieces.length} pieces`}
      data-testid="plate-map"
      onPointerMove={(e) => {
        if (!drag) return;
        const p = toMm(e);
        let dx = p.x - drag.x0,
          dy = p.y - drag.y0;
        if (!e.altKey) {
          dx = Math.round(dx * 2) / 2;
          dy = Math.round(dy * 2) / 2;
        }
        setDrag({ ...drag, dx, dy });
      }}
      onPointerUp={() => {
        if (drag && (drag.dx || drag.dy)) onMove(drag.piece, drag.dx, drag.dy);
        setDrag(null);
      }}
      onPointerLeave={() => setDrag(null)}
    >
      <g transform={`translate(0 ${D}) scale(1 -1)`}>
        <path d={path(layout.slab.outline)} fill="#efe8dc" stroke="#c9bfae" strokeWidth={0.4} />
        {layout.markOutlines ? <path d={path(layout.markOutlines)} fill="#a99c86" /> : null}
        {layout.marks.map((m, i) => (
          <rect
            key={i}
            x={m.bounds.minX}
            y={m.bounds.minY}
            width={m.bounds.maxX - m.bounds.minX}
            height={m.bounds.maxY - m.bounds.minY}
            fill="none"
            stroke="#c9bfae"
            strokeDasharray="1 1"
            strokeWidth={0.2}
          />
        ))}
        {pieces.map((p) => {
          const moving = drag?.piece.slot === p.slot;
          const colour = p.slot === selected ? "#6d4aff" : flagged.has(p.slot) ? "#b7791f" : "#4a4f57";
          return (
            <g
              key={p.slot}
              transform={moving ? `translate(${drag.dx} ${drag.dy})` : undefined}
              data-testid={`map-piece-${p.number}`}
              data-slot={p.slot}
              className={`${readOnly ? "cursor-pointer" : "cursor-grab"} ${FOCUS_RING}`}
              tabIndex={0}
              role="button"
              aria-label={`Piece ${p.number}, ${p.partName}${readOnly ? "" : ": arrow keys move it, R turns it"}`}
              aria-pressed={p.slot === selected}
              onFocus={() => onSelect(p.slot)}
              onKeyDown={(e) => {
                if (readOnly) return;
                const step = e.shiftKey ? 5 : 0.5;
                const moves: Record<string, [number, number]> = {
                  ArrowLeft: [-step, 0],
                  ArrowRight: [step, 0],
                  ArrowUp: [0, step],
                  ArrowDown: [0, -step],
                };
                const mv = moves[e.key];
                if (mv) {
                  e.preventDefault();
                  onMove(p, mv[0], mv[1]);
                } else if (e.key.toLowerCase() === "r") {
                  e.preventDefault();
                  onMove(p, 0, 0, e.shiftKey ? 1 : 15);
                }
              }}
              onPointerDown={(e) => {
                e.currentTarget.ownerSVGElement?.setPointerCapture?.(e.pointerId);
                onSelect(p.slot);
                if (readOnly) return;
                const q = toMm(e);
                setDrag({ piece: p, x0: q.x, y0: q.y, dx: 0, dy: 0 });
              }}
            >
              <path d={path(p.outline)} fill={colour} fillOpacity={0.85} stroke="#1f2328" strokeWidth={0.2} />
            </g>
          );
        })}
      </g>
      {pieces.map((p) => {
        const moving = drag?.piece.slot === p.slot;
        const size = Math.max(2.5, Math.min(6, (p.bounds.maxX - p.bounds.minX) / 2.5));
        return (
          <text
            key={p.slot}
            x={(p.bounds.minX + p.bounds.maxX) / 2 + (moving ? drag.dx : 0)}
            y={D - (p.bounds.minY + p.bounds.maxY) / 2 - (moving ? drag.dy : 0)}
            fontSize={size}
            fontFamily="var(--font-mono)"
            fontWeight="bold"
            fill="#fff"
            textAnchor="middle"
            dominantBaseline="central"
            pointerEvents="none"
          >
            {p.number}
          </text>
        );
      })}
    </svg>
  );
}
