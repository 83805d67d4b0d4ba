import { readFileSync } from "node:fs";
import path from "node:path";
import { baseUrl } from "./http";

/**
 * Call a server action over HTTP exactly as the app's own pages do (Next-Action header, arguments as
 * the JSON body), so the test goes through the built app, its Origin check and its cookies. The
 * action's id comes from the build's server-reference manifest.
 */
function actionId(file: string, name: string): string {
  const manifest = JSON.parse(readFileSync(path.join(process.cwd(), ".next/server/server-reference-manifest.json"), "utf8")) as {
    node: Record<string, { filename?: string; exportedName?: string }>;
  };
  const hit = Object.entries(manifest.node).find(([, v]) => v.filename === file && v.exportedName === name);
  if (!hit) throw new Error(`no server action ${name} in ${file} in the build`);
  return hit[0];
}

export type ActionAnswer = { status: number; redirect: string | null; body: string; setCookies: string[] };

export async function callAction(
  page: string,
  file: string,
  name: string,
  args: unknown[],
  init: { cookie?: string; headers?: Record<string, string> } = {},
): Promise<ActionAnswer> {
  const res = await fetch(`${baseUrl()}${page}`, {
    method: "POST",
    redirect: "manual",
    headers: {
      "next-action": actionId(file, name),
      accept: "text/x-component",
      "content-type": "text/plain;charset=UTF-8",
      origin: baseUrl(),
      ...(init.cookie ? { cookie: init.cookie } : {}),
      ...init.headers,
    },
    body: JSON.stringify(args),
  });
  const redirect = res.headers.get("x-action-redirect");
  // The redirect's target as a path of ours ("/parts"), whether Next wrote it absolute or not.
  const target = redirect ? new URL(redirect.split(";")[0]!, baseUrl()) : null;
  return {
    status: res.status,
    redirect: target ? `${target.pathname}${target.search}` : null,
    body: await res.text(),
    setCookies: res.headers.getSetCookie(),
  };
}

/** A cookie jar that follows Set-Cookie (including deletions), for sessions made by actions. */
export class Jar {
  private readonly jar = new Map<string, string>();
  take(setCookies: string[]): this {
    for (const c of setCookies) {
      const [pair, ...attrs] = c.split(";");
      const i = pair!.indexOf("=");
      const name = pair!.slice(0, i).trim();
      const value = pair!.slice(i + 1);
      const expired = attrs.some(
        (a) => /^\s*max-age=0/i.test(a) || (/^\s*expires=/i.test(a) && new Date(a.split("=")[1]!).getTime() < Date.now()),
      );
      if (expired || value === "") this.jar.delete(name);
      else this.jar.set(name, value);
    }
    return this;
  }
  has(part: string): boolean {
    return [...this.jar.keys()].some((k) => k.includes(part));
  }
  header(): string {
    return [...this.jar].map(([k, v]) => `${k}=${v}`).join("; ");
  }
}
