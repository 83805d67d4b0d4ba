// Entry of the proof's second thread: tsx's TypeScript loader registered inside this thread, then the module.
import { register } from "tsx/esm/api";

register();
await import("./proof-thread-worker.ts");
