// Typed refusal of a vector upload (mapped to HTTP 422 by the API): RFC 9457 problem `detail` comes from `detail`.

export type VectorErrorCode =
  | "not_json"
  | "too_deep"
  | "too_many_coordinates"
  | "file_too_large"
  | "not_feature_collection"
  | "not_lines"
  | "bad_geometry"
  | "bad_attribute"
  | "crs_missing"
  | "crs_unknown"
  | "unsafe_zip_entry"
  | "zip_too_large"
  | "zip_too_many_entries"
  | "bad_zip"
  | "no_shapefile"
  | "bad_shapefile"
  | "unsupported_file"
  | "no_lines";

export class VectorError extends Error {
  readonly code: VectorErrorCode;
  readonly detail: string;
  constructor(code: VectorErrorCode, detail: string) {
    super(`${code}: ${detail}`);
    this.name = "VectorError";
    this.code = code;
    this.detail = detail;
  }
}
