// Typed failures of reading a raster; the API maps each code to a 422 problem document.

export type RasterErrorCode =
  | "too-large" // declared size exceeds the cell budget
  | "unsupported" // a valid TIFF feature we do not decode (compression, sample type, layout)
  | "corrupt" // the file breaks the TIFF layout or a block does not decode to its declared size
  | "not-tiff" // the bytes are not a TIFF at all
  | "crs-missing" // no CRS in the GeoKeys and none given
  | "crs-unknown" // a CRS code we cannot resolve (user-defined or not in the EPSG index)
  | "georef-missing" // neither tiepoint + pixel scale nor a model transformation
  | "rotated" // the model transformation rotates or shears the grid
  | "band-required" // several bands and no band chosen
  | "aborted";

export class RasterError extends Error {
  readonly code: RasterErrorCode;
  /** what exactly was found, for the problem document's detail */
  readonly detail: string;

  constructor(code: RasterErrorCode, detail: string) {
    super(`${code}: ${detail}`);
    this.name = "RasterError";
    this.code = code;
    this.detail = detail;
  }
}
