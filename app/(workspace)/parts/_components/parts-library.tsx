"use client";

import { useState } from "react";
import { follow, type UploadBody } from "./follow-upload";
import useSWR from "swr";
import { UploadZone } from "./upload-zone";
import type { Unit } from "@/lib/geometry/io/raw";
import { unitWords } from "@/lib/geometry/units";

type Row = {
  id: string;
  name: string;
  format: string;
  triangles: number;
  sizeX: number;
  sizeY: number;
  sizeZ: number;
  volume: number;
  contactArea: number | null;
  repairs: string[];
  warnings: { code: string; message: string; suggestion?: { unit: string } }[];
  unit: Unit;
  layFlat: boolean;
  bodies: number;
  createdAt: string;
  uploadedBy: string | null;
  thumbnail: string;
};
type Page = { rows: Row[]; total: number; page: number; pages: number };
/** mm² to the precision the size calls for: a 0.32 mm² foot is not "0". */
const contact = (a: number) => a.toFixed(a >= 100 ? 0 : a >= 1 ? 1 : 2);

type Sort = "name" | "triangles" | "volume" | "contactArea" | "createdAt" | "sizeZ";

const fetcher = async (url: string) => {
  const r = await fetch(url);
  if (!r.ok)
    throw new Error(((await r.json().catch(() => null)) as { error?: { message?: string } } | null)?.error?.message ?? `HTTP ${r.status}`);
  return (await r.json()) as Page;
};

const mm = (v: number) => v.toFixed(1);

export function PartsLibrary({ canWrite }: { canWrite: boolean }) {
  const [search, setSearch] = useState("");
  const [sort, setSort] = useState<Sort>("createdAt");
  const [dir, setDir] = useState<"asc" | "desc">("desc");
  const [page, setPage] = useState(1);
  const [notice, setNotice] = useState<{ ok: boolean; text: string } | null>(null);
  const key = `/api/parts?${new URLSearchParams({ search, sort, dir, page: String(page), pageSize: "20" })}`;
  const { data, error, isLoading, mutate } = useSWR(key, fetcher, { keepPreviousData: true });

  const act = async (url: string, init: RequestInit, done?: string) => {
    const r = await fetch(url, { ...init, headers: { "Content-Type": "application/json" } });
    const body = (await r.json().catch(() => null)) as (UploadBody & { error?: { message?: string } }) | null;
    if (!r.ok) {
      setNotice({ ok: false, text: body?.error?.message ?? `That did not work (HTTP ${r.status}).` });
    } else if (r.status === 202 && body?.upload) {
      // Read again by a build worker (a new unit, lying flat, a split): follow it to the end.
      setNotice({ ok: true, text: "Reading the part again…" });
      await mutate();
      const end = await follow(body.upload.url);
      if (end?.upload?.state === "ready") setNotice({ ok: true, text: done ?? "Done." });
      else setNotice({ ok: false, text: end?.upload?.error?.message ?? end?.error?.message ?? "That did not work." });
    } else if (done) setNotice({ ok: true, text: done });
    await mutate();
  };
  const header = (label: string, s?: Sort) => (
    <th scope="col" className="px-3 py-2 font-bold" aria-sort={s && sort === s ? (dir === "asc" ? "ascending" : "descending") : undefined}>
      {s ? (
        <button
          type="button"
          className="uppercase tracking-wide hover:text-ink"
          onClick={() => {
            if (sort === s) setDir(dir === "asc" ? "desc" : "asc");
            else {
              setSort(s);
              setDir(s === "name" ? "asc" : "desc");
            }
            setPage(1);
          }}
        >
          {label} {sort === s ? (dir === "asc" ? "↑" : "↓") : ""}
        </button>
      ) : (
        label
      )}
    </th>
  );

  return (
    <div>
      {canWrite ? <UploadZone onUploaded={() => void mutate()} onAction={(u, i) => act(u, i, "Done.")} /> : null}
      <div className="mb-3 flex flex-wrap items-center gap-3">
        <label className="sr-only" htmlFor="part-search">
          Search parts
        </label>
        <input
          id="part-search"
          type="search"
          placeholder="Search by name"
          className="field-input max-w-xs"
          value={search}
          onChange={(e) => {
            setSearch(e.target.value);
            setPage(1);
          }}
        />
        <span className="text-sm text-muted">
          {data ? `${data.total} ${data.total === 1 ? "part" : "parts"}` : isLoading ? "loading…" : ""}
        </span>
      </div>
      {notice ? (
        <p
          data-testid="parts-notice"
          className={
            `mb-3 rounded-card border px-3 py-2 text-sm ` +
            `${notice.ok ? "border-accent/40 bg-accent-soft" : "border-finding-error/40 text-finding-error"}`
          }
        >
          {notice.ok ? "✓ " : "✕ "}
          {notice.text}
        </p>
      ) : null}
      {error ? <p className="text-sm text-finding-error">✕ {String(error.message)}</p> : null}
      {data && data.rows.length === 0 ? (
        <div className="card px-6 py-10 text-center text-sm text-muted">
          {search ? "No part matches that name." : "No parts yet: drop the STL, 3MF or OBJ files of a kit above."}
        </div>
      ) : null}
      {data && data.rows.length > 0 ? (
        <div className="card overflow-x-auto">
          <table className="w-full text-left text-sm [&_td]:whitespace-nowrap" aria-label="Parts">
            <thead className="border-b border-hairline text-xs uppercase tracking-wide text-muted">
              <tr>
                {header("")}
                {header("Name", "name")}
                {header("Triangles", "triangles")}
                {header("Size x × y × z (mm)", "sizeZ")}
                {header("Contact (mm²)", "contactArea")}
                {header("Volume (cm³)", "volume")}
                {header("Repairs")}
                {header("Uploaded", "createdAt")}
                {canWrite ? header("") : null}
              </tr>
            </thead>
            <tbody className="divide-y divide-hairline">
              {data.rows.map((p) => (
                <tr key={p.id} data-testid={`part-${p.name}`}>
                  <td className="px-3 py-1">
                    {/* eslint-disable-next-line @next/next/no-img-element */}
                    <img
                      src={p.thumbnail}
                      alt={`Top view of ${p.name}`}
                      width={48}
                      height={48}
                      className="h-12 w-12 min-w-12 max-w-none rounded bg-paper"
                    />
                  </td>
                  <td className="px-3 py-2">
                    <span className="font-bold">{p.name}</span>
                    <span className="block text-xs text-muted">
                      {p.format.toUpperCase()}
                      {p.unit !== "millimeter" ? ` · read in ${unitWords(p.unit)}` : ""}
                      {p.layFlat ? " · laid flat" : ""}
                      {p.bodies > 1 ? ` · ${p.bodies} bodies` : ""}
                    </span>
                    {p.warnings.map((w) => (
                      <span key={w.code} className="block max-w-xs whitespace-normal text-xs text-finding-warning">
                        ⚠ {w.message}
                      </span>
                    ))}
                  </td>
                  <td className="px-3 py-2 font-mono">{p.triangles.toLocaleString("en-US")}</td>
                  <td className="px-3 py-2 font-mono">
                    {mm(p.sizeX)} × {mm(p.sizeY)} × {mm(p.sizeZ)}
                  </td>
                  <td className="px-3 py-2 font-mono">{p.contactArea === null ? "—" : contact(p.contactArea)}</td>
                  <td className="px-3 py-2 font-mono">{(p.volume / 1000).toFixed(2)}</td>
                  <td className="max-w-[14rem] whitespace-normal! px-3 py-2 text-xs text-muted">
                    {p.repairs.length ? p.repairs.join("; ") : "none"}
                  </td>
                  <td className="px-3 py-2 text-xs text-muted">
                    <span className="block">{p.createdAt.slice(0, 10)}</span>
                    {p.uploadedBy ? <span className="block">{p.uploadedBy}</span> : null}
                  </td>
                  {canWrite ? (
                    <td className="px-3 py-2">
                      <div className="flex min-w-40 flex-wrap justify-end gap-1 whitespace-normal">
                        <button
                          type="button"
                          className="btn-quiet px-2 py-0.5 text-xs"
                          onClick={() => {
                            const name = prompt("New name for the part", p.name);
                            if (name && name.trim() && name !== p.name)
                              void act(`/api/parts/${p.id}`, { method: "PATCH", body: JSON.stringify({ name: name.trim() }) }, "Renamed.");
                          }}
                        >
                          Rename
                        </button>
                        <button
                          type="button"
                          className="btn-quiet px-2 py-0.5 text-xs"
                          onClick={() =>
                            void act(
                              `/api/parts/${p.id}`,
                              { method: "PATCH", body: JSON.stringify({ layFlat: !p.layFlat }) },
                              p.layFlat ? "Back as imported." : "Laid flat on its largest face.",
                            )
                          }
                        >
                          {p.layFlat ? "As imported" : "Lay flat"}
                        </button>
                        {p.bodies > 1 ? (
                          <button
                            type="button"
                            className="btn-quiet px-2 py-0.5 text-xs"
                            onClick={() => void act(`/api/parts/${p.id}/split`, { method: "POST" }, `Split into ${p.bodies} parts.`)}
                          >
                            Split into {p.bodies}
                          </button>
                        ) : null}
                        <button
                          type="button"
                          className="btn-quiet px-2 py-0.5 text-xs text-finding-error"
                          onClick={() => {
                            if (confirm(`Delete ${p.name}?`)) void act(`/api/parts/${p.id}`, { method: "DELETE" }, "Deleted.");
                          }}
                        >
                          Delete
                        </button>
                      </div>
                    </td>
                  ) : null}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      {data && data.pages > 1 ? (
        <nav className="mt-3 flex items-center gap-3 text-sm" aria-label="Pages">
          <button type="button" className="btn-quiet px-3 py-1" disabled={page <= 1} onClick={() => setPage(page - 1)}>
            Previous
          </button>
          <span className="text-muted">
            Page {data.page} of {data.pages}
          </span>
          <button type="button" className="btn-quiet px-3 py-1" disabled={page >= data.pages} onClick={() => setPage(page + 1)}>
            Next
          </button>
        </nav>
      ) : null}
    </div>
  );
}
