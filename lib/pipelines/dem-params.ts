// Request parameters shared by the pipelines that read a DEM (drainage, surface); each feeds readDem's option of
// the same name (lib/raster/read-geotiff.ts).
import { z } from "zod";

// A negative factor would turn the DEM upside down (ridges become channels); zod's number is finite.
export const zFactorParam = z.number().gt(0).optional()
  .describe("dimensionless factor applied to elevations after the vertical unit is converted to metres; finite, > 0; default 1");

export const bandParam = z.number().int().min(1).max(65535).optional().describe("1-based band of the GeoTIFF; required when it has several");

export const epsgParam = z.number().int().min(1024).max(32767).optional()
  .describe("EPSG code of the DEM's CRS, when the file lacks one or states it wrongly");
