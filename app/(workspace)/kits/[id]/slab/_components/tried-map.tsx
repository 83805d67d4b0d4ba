"use client";

import type { TriedLayout } from "@/lib/geometry/build-plate";
import type { Box } from "@/lib/geometry/plate-context";

const rect = (b: Box) => ({ x: b.minX, y: b.minY, width: b.maxX - b.minX, height: b.maxY - b.minY });

/**
 * The plate map when the pieces do not fit the bed: the bed, the room its margins and the text and
 * QR bands leave (dashed), and every piece where it was tried. What reaches past the room is drawn in
 * the error colour with a heavy outline and named below, with the finding in words.
 */
export function TriedMap({ tried, message }: { tried: TriedLayout; message?: string }) {
  const { width: W, depth: D } = tried.bed;
  const maxX = Math.max(W, ...tried.pieces.map((p) => p.bounds.maxX)) + 2;
  const maxY = Math.max(D, ...tried.pieces.map((p) => p.bounds.maxY)) + 2;
  const minX = Math.min(0, ...tried.pieces.map((p) => p.bounds.minX)) - 2;
  const minY = Math.min(0, ...tried.pieces.map((p) => p.bounds.minY)) - 2;
  const over = tried.pieces.filter((p) => p.overflows);
  return (
    <div className="flex h-full flex-col gap-1" data-testid="tried-map">
      <svg
        viewBox={`${minX} ${-maxY} ${maxX - minX} ${maxY - minY}`}
        className="min-h-0 w-full flex-1"
        role="img"
        aria-label={`The layout that was tried: ${over.length} of ${tried.pieces.length} pieces reach past the ${W} × ${D} mm bed`}
      >
        <g transform="scale(1 -1)">
          <rect {...rect({ minX: 0, minY: 0, maxX: W, maxY: D })} fill="#efe8dc" stroke="#5c6370" strokeWidth={0.6} />
          <rect {...rect(tried.room)} fill="none" stroke="#5c6370" strokeDasharray="2 1.5" strokeWidth={0.3} />
          {[tried.bands.bottom, tried.bands.top].map((b, i) =>
            b ? (
              <rect
                key={i}
                {...rect(b)}
                fill="#a99c86"
                fillOpacity={0.35}
                stroke={tried.bands.overflows ? "#c8322d" : "#a99c86"}
                strokeWidth={tried.bands.overflows ? 0.8 : 0.3}
              />
            ) : null,
          )}
          {tried.pieces.map((p) => (
            <polygon
              key={p.slot}
              points={p.outline.map(([x, y]) => `${x.toFixed(2)},${y.toFixed(2)}`).join(" ")}
              fill={p.overflows ? "#c8322d" : "#4a4f57"}
              fillOpacity={p.overflows ? 0.25 : 0.85}
              stroke={p.overflows ? "#c8322d" : "#1f2328"}
              strokeWidth={p.overflows ? 0.9 : 0.2}
              data-testid={p.overflows ? "tried-overflow" : "tried-piece"}
            />
          ))}
        </g>
      </svg>
      <p className="text-xs text-finding-error" data-testid="tried-finding">
        <span aria-hidden="true">✕ </span>
        {message ?? "The pieces do not fit the bed."} Outlined in red:{" "}
        {over.length
          ? `${over.length} of ${tried.pieces.length} pieces reach past the bed`
          : tried.bands.overflows
            ? "the text and QR are wider than the bed"
            : "nothing single; together they need more room"}
        .
      </p>
    </div>
  );
}
