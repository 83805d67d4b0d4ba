/**
 * Typed errors of the engine. Every import problem carries a stable `code` (for the API and the UI),
 * the file's name, and a plain message a person can act on.
 */
import { ACCEPTED_FORMATS } from "./formats";

export type ImportErrorCode =
  | "not_a_mesh"
  | "empty"
  | "truncated"
  | "bad_triangle_count"
  | "malformed"
  | "non_finite"
  | "index_out_of_range"
  | "open_mesh"
  | "not_manifold"
  | "zero_volume"
  | "too_many_triangles"
  | "too_many_vertices"
  | "too_many_bodies"
  | "too_many_components"
  | "file_too_large"
  | "archive_too_large"
  | "xml_dtd_forbidden"
  | "unsupported_extension"
  | "unsupported_archive";

export class MeshImportError extends Error {
  constructor(
    readonly code: ImportErrorCode,
    readonly file: string,
    message: string,
    readonly details?: Record<string, unknown>,
  ) {
    super(`${file}: ${message}`);
    this.name = "MeshImportError";
  }
  /** The message without the file name, for a UI that shows the name beside it. */
  get plain(): string {
    return this.message.slice(this.file.length + 2);
  }
}

export { ACCEPTED_FORMATS };

export class UnsupportedFormatError extends MeshImportError {
  constructor(file: string, why: string) {
    super("not_a_mesh", file, `${why}. Slabwright reads ${ACCEPTED_FORMATS.join(", ")}.`, { accepted: [...ACCEPTED_FORMATS] });
    this.name = "UnsupportedFormatError";
  }
}

/** A kernel failure we did not expect (kept apart from bad input so it is logged, not shown verbatim). */
export class KernelError extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
    this.name = "KernelError";
  }
}
