// Resource caps for reading uploaded vector files; each value bounds memory or work for one job.

/** Deepest JSON nesting accepted. A MultiLineString FeatureCollection needs 6 levels
 *  (collection → features → feature → geometry → coordinates → line → position); 64 leaves room
 *  for nested properties while refusing hostile documents long before JSON.parse could recurse deeply. */
export const MAX_JSON_DEPTH = 64;

/** Positions accepted in one upload: 5 million (80 MB as Float64 x,y), about a national
 *  hydrography layer of a mid-sized country at 1:25 000. */
export const MAX_COORDINATES = 5_000_000;

/** GeoJSON text accepted, bytes; about 20 bytes per position at MAX_COORDINATES plus properties. */
export const MAX_GEOJSON_BYTES = 256 * 1024 * 1024;

/** Total bytes a zip may inflate to: the inflated entries are held in memory, so this bounds memory. */
export const MAX_UNZIPPED_BYTES = 256 * 1024 * 1024;

/** Entries accepted in one zip: a Shapefile has at most about a dozen side files. */
export const MAX_ZIP_ENTRIES = 64;

/** Longest entry name accepted, bytes (common file-system limit for one name component). */
export const MAX_ZIP_NAME_BYTES = 255;
