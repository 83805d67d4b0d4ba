/** A part as an upload (or a part read again) reports it once a build worker has checked it. */
export type UploadedPart = {
  id: string;
  name: string;
  bodies: number;
  warnings: { code: string; message: string; suggestion?: { unit: string } }[];
};

export type UploadBody = {
  upload?: {
    id: string;
    state: "checking" | "ready" | "refused";
    url: string;
    parts?: UploadedPart[];
    error?: { code: string; message: string };
  };
  error?: { code: string; message: string };
} | null;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * Follow an upload until a build worker has checked it: ready (its parts) or refused (the reason).
 * Polls quickly at first, then every two seconds; gives up after ten minutes.
 */
export async function follow(url: string): Promise<UploadBody> {
  const until = Date.now() + 10 * 60_000;
  for (let i = 0; Date.now() < until; i++) {
    await sleep(i < 10 ? 400 : 2000);
    try {
      const res = await fetch(url, { cache: "no-store" });
      const body = (await res.json()) as UploadBody;
      if (!res.ok) return body;
      if (body?.upload && body.upload.state !== "checking") return body;
    } catch {
      // a dropped poll: try again
    }
  }
  return { error: { code: "timeout", message: "The file is still being checked; look for it in the library later." } };
}
