// GDAL (Debian's gdal-bin) as the outside reference for the raster tests, and the fixture paths.
import { spawnSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";

const cache = path.resolve(import.meta.dirname, "../../fixtures/cache");

/** Path of a fixture under tests/fixtures/cache; fails (never skips) when it was not built. */
export function fixture(relative: string): string {
  const p = path.join(cache, relative);
  if (!existsSync(p)) throw new Error(`fixture ${relative} is missing: run \`bash tests/fixtures/fetch.sh\``);
  return p;
}

/** The base array every variant is written from: 97 × 61 Float32, its 0 cells the nodata. */
export function baseArray(): Float32Array {
  const buf = readFileSync(fixture("variants/base.f32"));
  return new Float32Array(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength));
}

function run(cmd: string, args: string[]): string {
  const r = spawnSync(cmd, args, { encoding: "utf8", maxBuffer: 1 << 28, env: { ...process.env, GDAL_PAM_ENABLED: "NO" } });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(" ")} failed: ${r.stderr || r.error}`);
  return r.stdout;
}

export interface GdalInfo {
  size: [number, number];
  geoTransform: number[];
  epsg: number | null;
  noData: number | null;
  type: string;
  corners: { upperLeft: [number, number]; lowerRight: [number, number] };
}

export function gdalInfo(file: string): GdalInfo {
  const j = JSON.parse(run("gdalinfo", ["-json", file])) as {
    size: [number, number]; geoTransform: number[]; coordinateSystem?: { wkt: string };
    bands: { noDataValue?: number | string; type: string }[];
    cornerCoordinates: { upperLeft: [number, number]; lowerRight: [number, number] };
  };
  const ids = [...(j.coordinateSystem?.wkt ?? "").matchAll(/ID\["EPSG",(\d+)\]/g)];
  const nd = j.bands[0].noDataValue;
  return {
    size: j.size, geoTransform: j.geoTransform, epsg: ids.length ? Number(ids[ids.length - 1][1]) : null,
    noData: nd === undefined ? null : nd === "NaN" ? NaN : Number(nd), type: j.bands[0].type, corners: j.cornerCoordinates,
  };
}

/** Cell values as GDAL decodes them (through its ASCII grid output), NaN where GDAL says nodata. */
export function gdalValues(file: string): Float64Array {
  const lines = run("gdal_translate", ["-q", "-of", "AAIGrid", file, "/vsistdout/"]).split("\n");
  let nodata: number | null = null;
  const values: number[] = [];
  for (const line of lines) {
    if (/^[a-z]/i.test(line)) {
      const [key, v] = line.trim().split(/\s+/);
      if (key.toLowerCase() === "nodata_value") nodata = Number(v);
      continue;
    }
    for (const t of line.trim().split(/\s+/)) if (t) values.push(Number(t));
  }
  return Float64Array.from(values, (v) => (nodata !== null && v === nodata) || Number.isNaN(v) ? NaN : v);
}

/** Number of cells where a and b differ (NaN equals NaN). */
export function mismatches(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) return Math.max(a.length, b.length);
  let n = 0;
  for (let i = 0; i < a.length; i++) if (!(a[i] === b[i] || (a[i] !== a[i] && b[i] !== b[i]))) n++;
  return n;
}
