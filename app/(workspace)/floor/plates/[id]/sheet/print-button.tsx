"use client";

export function PrintButton() {
  return (
    <button type="button" className="btn-quiet px-3 py-1 text-sm" onClick={() => window.print()}>
      Print this page
    </button>
  );
}
