// The engine's public surface. Pure: no next, react, drizzle, node:fs or other lib/ imports below here.
export * from "./errors";
export * from "./kernel";
export * from "./mesh";
export * from "./import";
export * from "./orient";
export { writeBinaryStl } from "./io/stl-write";
export { write3mf, build3mfModel, type ThreeMfBody, type ThreeMfMeta } from "./io/3mf-write";
export { type DeflateRaw } from "./io/zip-write";
export { UNIT_MM, type Unit } from "./io/raw";
export type { Finding, FindingCode, Severity } from "./checks";
