// Types for the parts of the `shapefile` npm package (Bostock) that lib/vector uses; it ships none.
declare module "shapefile" {
  interface ShapefileSource {
    bbox: number[];
    read(): Promise<{ done: boolean; value: { type: "Feature"; properties: Record<string, unknown> | null; geometry: { type: string; coordinates: unknown } | null } }>;
    cancel(): Promise<void>;
  }
  export function open(shp: ArrayBuffer | Uint8Array | string, dbf?: ArrayBuffer | Uint8Array | string | null, options?: { encoding?: string }): Promise<ShapefileSource>;
}
