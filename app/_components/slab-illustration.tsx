/**
 * A drawn slab for the landing page: pieces on outline rings, numbers beside them, an engraved line of
 * text and an order label. Decorative only (the real plate map is drawn from a built plate).
 */
export function SlabIllustration() {
  const pieces = [
    { n: 1, x: 70, y: 70, w: 70, h: 46 },
    { n: 2, x: 170, y: 64, w: 52, h: 58 },
    { n: 3, x: 252, y: 74, w: 64, h: 40 },
    { n: 4, x: 70, y: 150, w: 46, h: 46 },
    { n: 5, x: 150, y: 152, w: 86, h: 40 },
  ];
  return (
    <svg
      viewBox="0 0 380 280"
      className="h-auto w-full"
      role="img"
      aria-label="A carrier slab seen from above, with five numbered pieces standing on outlines"
    >
      <rect x="20" y="24" width="340" height="232" rx="22" fill="#efe8dc" stroke="#c9bfae" strokeWidth="2" />
      {pieces.map((p) => (
        <g key={p.n}>
          <rect x={p.x - 5} y={p.y - 5} width={p.w + 10} height={p.h + 10} rx="9" fill="none" stroke="#a99c86" strokeWidth="2" />
          <rect x={p.x} y={p.y} width={p.w} height={p.h} rx="6" fill={p.n === 2 ? "#6d4aff" : "#4a4f57"} />
          <text x={p.x - 12} y={p.y - 10} fontSize="12" fontWeight="700" fill="#7a6e5b" fontFamily="var(--font-mono)">
            {p.n}
          </text>
        </g>
      ))}
      {/* the fourth outline stands empty: a piece missing at the packing bench */}
      <rect x="259" y="145" width="56" height="56" rx="9" fill="none" stroke="#c8322d" strokeWidth="2" strokeDasharray="5 4" />
      <text x="247" y="140" fontSize="12" fontWeight="700" fill="#c8322d" fontFamily="var(--font-mono)">
        6
      </text>
      <text x="42" y="238" fontSize="13" fontWeight="700" fill="#8f826d">
        ORDER 10482 · THANK YOU, SAM
      </text>
      <g transform="translate(314 210)" fill="#8f826d">
        <rect width="30" height="30" rx="2" fill="none" stroke="#8f826d" strokeWidth="2" />
        <rect x="6" y="6" width="7" height="7" />
        <rect x="17" y="6" width="7" height="7" />
        <rect x="6" y="17" width="7" height="7" />
        <rect x="18" y="18" width="4" height="4" />
      </g>
    </svg>
  );
}
