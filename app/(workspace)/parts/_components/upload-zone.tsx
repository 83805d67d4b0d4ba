"use client";

import { useCallback, useRef, useState } from "react";
import { ACCEPT_ATTRIBUTE } from "@/lib/geometry/formats";
import { follow, type UploadBody } from "./follow-upload";
import { CodeDetails } from "@/app/_components/code-details";

type Item = {
  key: string;
  name: string;
  size: number;
  state: "waiting" | "sending" | "checking" | "done" | "failed";
  sent: number;
  message?: string;
  code?: string;
  parts?: { id: string; name: string; bodies: number; warnings: { code: string; message: string; suggestion?: { unit: string } }[] }[];
};

const ACCEPT = ACCEPT_ATTRIBUTE;

/** Send one file as the raw body with XMLHttpRequest, the one browser API that reports upload progress. */
function send(file: File, onProgress: (sent: number) => void, onSent: () => void): Promise<{ status: number; body: unknown }> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api/parts?name=${encodeURIComponent(file.name)}`);
    xhr.setRequestHeader("Content-Type", "application/octet-stream");
    xhr.upload.onprogress = (e) => onProgress(e.loaded);
    xhr.upload.onload = onSent;
    xhr.onload = () => {
      let body: unknown;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = null;
      }
      resolve({ status: xhr.status, body });
    };
    xhr.onerror = () => resolve({ status: 0, body: { error: { code: "network", message: "The connection dropped; try again." } } });
    xhr.send(file);
  });
}

export function UploadZone({
  onUploaded,
  onAction,
}: {
  onUploaded: () => void;
  onAction: (url: string, init: RequestInit) => Promise<void>;
}) {
  const [items, setItems] = useState<Item[]>([]);
  const [over, setOver] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const update = (key: string, patch: Partial<Item>) => setItems((list) => list.map((i) => (i.key === key ? { ...i, ...patch } : i)));

  const add = useCallback(
    async (files: FileList | File[]) => {
      const fresh: Item[] = [...files].map((f, i) => ({
        key: `${Date.now()}-${i}-${f.name}`,
        name: f.name,
        size: f.size,
        state: "waiting",
        sent: 0,
      }));
      setItems((list) => [...fresh, ...list]);
      // Sent one at a time, so order stays readable; each is then checked by a build worker while the
      // next one is sent, and its row follows the check until it is added or refused.
      for (const [i, f] of [...files].entries()) {
        const key = fresh[i]!.key;
        update(key, { state: "sending" });
        const res = await send(
          f,
          (sent) => update(key, { sent }),
          () => update(key, { state: "checking", sent: f.size }),
        );
        const body = res.body as UploadBody;
        const settle = (b: UploadBody) => {
          if (b?.upload?.state === "ready") update(key, { state: "done", parts: b.upload.parts ?? [] });
          else {
            const e = b?.upload?.error ?? b?.error;
            update(key, { state: "failed", code: e?.code ?? `http_${res.status}`, message: e?.message ?? "The upload failed." });
          }
          onUploaded();
        };
        if (res.status === 202 && body?.upload) {
          update(key, { state: "checking", sent: f.size });
          void follow(body.upload.url).then(settle);
        } else settle(body);
      }
    },
    [onUploaded],
  );

  return (
    <section aria-label="Upload parts" className="mb-6">
      <div
        data-testid="drop-zone"
        onDragOver={(e) => {
          e.preventDefault();
          setOver(true);
        }}
        onDragLeave={() => setOver(false)}
        onDrop={(e) => {
          e.preventDefault();
          setOver(false);
          if (e.dataTransfer.files.length) void add(e.dataTransfer.files);
        }}
        className={
          `card flex flex-col items-center gap-2 border-2 border-dashed px-6 py-8 text-center ` +
          `${over ? "border-accent bg-accent-soft" : "border-hairline"}`
        }
      >
        <p className="text-sm">Drop STL, 3MF or OBJ files here — as many as you like.</p>
        <button type="button" className="btn-primary" onClick={() => input.current?.click()}>
          Choose files
        </button>
        <input
          ref={input}
          type="file"
          multiple
          accept={ACCEPT}
          className="sr-only"
          aria-label="Mesh files"
          onChange={(e) => e.target.files && void add(e.target.files)}
        />
        <p className="text-xs text-muted">Each file is checked: welded where safe, refused with the reason when it cannot print.</p>
      </div>
      {items.length ? (
        <ul className="mt-3 space-y-2" aria-label="Uploads">
          {items.map((i) => (
            <li key={i.key} className="card px-3 py-2 text-sm" data-testid={`upload-${i.name}`}>
              <div className="flex flex-wrap items-center justify-between gap-2">
                <span className="font-bold">{i.name}</span>
                <span className={`text-xs ${i.state === "failed" ? "text-finding-error" : "text-muted"}`} data-testid="upload-state">
                  {i.state === "waiting" && "waiting"}
                  {i.state === "sending" && `sending ${Math.round((100 * i.sent) / Math.max(1, i.size))} %`}
                  {i.state === "checking" && "checking…"}
                  {i.state === "done" && "✓ added"}
                  {i.state === "failed" && "✕ refused"}
                </span>
              </div>
              {i.state === "sending" || i.state === "checking" || i.state === "waiting" ? (
                <progress
                  className="mt-1 h-1.5 w-full accent-[#6d4aff]"
                  max={Math.max(1, i.size)}
                  value={i.state === "checking" ? undefined : i.sent}
                  aria-label={`Progress of ${i.name}`}
                />
              ) : null}
              {i.state === "failed" ? (
                <p className="mt-1 text-finding-error" data-testid="upload-error">
                  {i.message} {i.code ? <CodeDetails code={i.code} /> : null}
                </p>
              ) : null}
              {i.parts?.map((p) => (
                <div key={p.id} className="mt-1 space-y-1">
                  {p.bodies > 1 ? (
                    <p>
                      This file holds {p.bodies} separate bodies.{" "}
                      <button
                        type="button"
                        className="btn-quiet px-2 py-0.5"
                        onClick={() =>
                          void onAction(`/api/parts/${p.id}/split`, { method: "POST" }).then(() => update(i.key, { parts: [] }))
                        }
                      >
                        Split into {p.bodies} parts
                      </button>
                    </p>
                  ) : null}
                  {p.warnings.map((w) => (
                    <p key={w.code} className="text-finding-warning">
                      ⚠ {w.message}{" "}
                      {w.suggestion ? (
                        <button
                          type="button"
                          className="btn-quiet px-2 py-0.5"
                          onClick={() =>
                            void onAction(`/api/parts/${p.id}`, {
                              method: "PATCH",
                              body: JSON.stringify({ unit: w.suggestion!.unit }),
                            }).then(() => update(i.key, { parts: i.parts?.map((x) => (x.id === p.id ? { ...x, warnings: [] } : x)) }))
                          }
                        >
                          Read as {w.suggestion.unit}s
                        </button>
                      ) : null}
                    </p>
                  ))}
                </div>
              ))}
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}
