import type { HttpSession } from "./http";

export type UploadState = {
  id: string;
  file: string;
  state: "checking" | "ready" | "refused";
  url: string;
  parts?: { id: string; name: string; bodies: number; triangles: number; warnings: { code: string; suggestion?: { unit: string } }[] }[];
  error?: { code: string; message: string; details?: Record<string, unknown> };
};

export const sendPart = (s: HttpSession, name: string, body: Uint8Array, query = "") =>
  s.fetch(`/api/parts?name=${encodeURIComponent(name)}${query}`, {
    method: "POST",
    body: new Uint8Array(body),
    headers: { "content-type": "application/octet-stream" },
  });

/** Follow a 202 upload answer until the worker has checked the file (bounded: 60 s). */
export async function settled(s: HttpSession, res: Response): Promise<UploadState> {
  if (res.status !== 202) throw new Error(`the upload was answered ${res.status}: ${await res.text()}`);
  let u = ((await res.json()) as { upload: UploadState }).upload;
  for (let i = 0; i < 300 && u.state === "checking"; i++) {
    await new Promise((r) => setTimeout(r, 200));
    u = ((await (await s.fetch(u.url)).json()) as { upload: UploadState }).upload;
  }
  return u;
}

/** Upload a file to the library and wait for its check. */
export async function uploadPart(s: HttpSession, name: string, body: Uint8Array, query = ""): Promise<UploadState> {
  return settled(s, await sendPart(s, name, body, query));
}
