// Entry of a build thread: register tsx's TypeScript loader inside this thread first (the parent's
// --import hook is not ready when a pool starts its threads eagerly), then load the real module.
import { register } from "tsx/esm/api";

register();
const mod = await import("./build-thread.ts");
export default mod.default;
// Named tasks (piscina's `run(task, { name })`).
export const importPart = mod.importPart;
