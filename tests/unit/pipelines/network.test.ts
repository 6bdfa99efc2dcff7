import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import proj4 from "proj4";
import { afterAll, describe, expect, test } from "vitest";
import { binaryTree } from "@/lib/fractal/synth/binary-tree";
import { mulberry32 } from "@/lib/fractal/synth/mulberry32";
import { tokunagaTree } from "@/lib/fractal/synth/tokunaga-tree";
import { upstreamLinks, type StreamNetwork } from "@/lib/network/model";
import { hortonTable } from "@/lib/network/horton";
import { strahlerStreams } from "@/lib/network/strahler";
import { runDrainage } from "@/lib/pipelines/drainage";
import { networkParamsSchema, runNetwork, type NetworkSummary } from "@/lib/pipelines/network";
import { crsFromEpsg } from "@/lib/raster/crs";
import { writeGeoTiff } from "@/lib/raster/write-geotiff";
import yazl from "yazl";
import { expectClose } from "@/tests/helpers/expect-close";

const LONLAT = "+proj=longlat +datum=WGS84 +no_defs";
const UTM32 = "+proj=utm +zone=32 +datum=WGS84 +units=m +no_defs";
const E0 = 500000, N0 = 5000000;
const tmp = mkdtempSync(path.join(tmpdir(), "rillscale-network-"));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/**
 * The generator's topology and link lengths redrawn as a plane tree (the generators' planforms are
 * schematic and may cross). Every source gets a slot of width s; a link climbs from its downstream
 * junction on a slanted segment to its slot centre at height δ, then straight up, the vertical part
 * sized so the link keeps its length exactly. Subtrees keep to disjoint slots, so nothing crosses.
 */
function planeLayout(network: StreamNetwork): { lines: Float64Array[]; outlets: [number, number][] } {
  const up = upstreamLinks(network);
  const n = network.links.length;
  const leaves = new Float64Array(n);
  const order: number[] = [];
  const stack = network.links.filter((l) => l.downstream < 0).map((l) => l.id);
  while (stack.length) { const i = stack.pop()!; order.push(i); stack.push(...up[i]); }
  for (let k = order.length - 1; k >= 0; k--) { const i = order[k]; leaves[i] = up[i].length === 0 ? 1 : up[i].reduce((s, j) => s + leaves[j], 0); }
  const minLength = Math.min(...network.links.map((l) => l.lengthM));
  const roots = network.links.filter((l) => l.downstream < 0).map((l) => l.id);
  const s = minLength / (2 * Math.max(...roots.map((r) => leaves[r])));
  const delta = minLength / 4;
  const xu = new Float64Array(n), yu = new Float64Array(n), start = new Float64Array(n);
  const lines: Float64Array[] = new Array(n);
  const outlets: [number, number][] = [];
  let offset = 0;
  for (const r of roots) { start[r] = offset; offset += leaves[r] * s + 4 * minLength; }
  for (const i of order) {
    const link = network.links[i];
    xu[i] = start[i] + (leaves[i] * s) / 2;
    const xd = link.downstream < 0 ? xu[i] : xu[link.downstream];
    const yd = link.downstream < 0 ? 0 : yu[link.downstream];
    if (link.downstream < 0) outlets.push([xd, yd]);
    yu[i] = yd + delta + link.lengthM - Math.hypot(xu[i] - xd, delta);
    lines[i] = Float64Array.of(xu[i], yu[i], xu[i], yd + delta, xd, yd);
    let child = start[i];
    for (const j of up[i]) { start[j] = child; child += leaves[j] * s; }
  }
  return { lines, outlets };
}

type Line = [number, number][];
const featureCollection = (lines: Line[], extra: Record<string, unknown> = {}) => ({
  type: "FeatureCollection",
  ...extra,
  features: lines.map((coordinates, i) => ({ type: "Feature", properties: { n: i }, geometry: { type: "LineString", coordinates } })),
});
const toPairs = (l: Float64Array, f: (x: number, y: number) => [number, number]): Line => {
  const out: Line = [];
  for (let i = 0; i < l.length; i += 2) out.push(f(l[i], l[i + 1]));
  return out;
};

/** A generator's network as UTM 32N GeoJSON (with the 2008 crs member) and its outlet in lon/lat. */
function utmGeoJson(network: StreamNetwork) {
  const { lines, outlets } = planeLayout(network);
  const toLonLat = proj4(UTM32, LONLAT);
  const features = lines.map((l) => toPairs(l, (x, y) => [E0 + x, N0 + y]));
  const outlet = toLonLat.forward([E0 + outlets[0][0], N0 + outlets[0][1]]) as [number, number];
  return { features, outlet, crs: { crs: { type: "name", properties: { name: "urn:ogc:def:crs:EPSG::32632" } } } };
}

/** Numbers rounded to 9 significant digits, so sums taken in another order compare equal. */
const rounded = (v: unknown): unknown =>
  typeof v === "number" ? Number(v.toPrecision(9)) : Array.isArray(v) ? v.map(rounded) : v && typeof v === "object" ? Object.fromEntries(Object.entries(v).map(([k, x]) => [k, rounded(x)])) : v;
/** The parts of a summary that must not depend on how the lines were digitised or ordered. */
const analysis = (s: NetworkSummary) => rounded({ orders: s.orders, horton: s.horton, dimension: s.dimension, hack: s.hack, tokunaga: s.tokunaga, network: s.network, divider: s.mainStemDivider, boxes: s.planformBoxCounting, outlets: s.topology.outlets, loops: s.topology.loops });

const params = { snapToleranceM: 0.01, outletRadiusM: 1 };

describe("runNetwork()", () => {
  const tok = tokunagaTree({ a: 1, c: 2, order: 5, linkLengthM: 100 });
  const tokDoc = utmGeoJson(tok);

  test("the Tokunaga (1, 2) tree of order 5 read back from GeoJSON gives R_B = 3.649505, R_L = 2 and R_A = 4.261827 (METHODS.md, derived finite least squares)", async () => {
    const { summary } = await runNetwork({ geojson: featureCollection(tokDoc.features, tokDoc.crs) }, { ...params, outlet: tokDoc.outlet });
    expect(summary.input.crs).toMatchObject({ epsg: 32632, from: "crs-member" });
    expect(summary.orders.map((o) => o.streams)).toEqual([171, 43, 11, 3, 1]); // N_ω = (2·4^(5−ω)+1)/3 (derived)
    expect(summary.orders.map((o) => o.links)).toEqual([171, 86, 44, 24, 16]); // N_ω streams × 2^(ω−1) links (derived)
    expectClose(summary.horton.bifurcation!.value, 3.649505, 1e-6);
    expectClose(summary.horton.length!.value, 2, 1e-9);
    expectClose(summary.horton.area!.value, 4.261827, 1e-6);
    expect(summary.topology).toMatchObject({ snappedEndpoints: 0, midLineJunctions: 0, loops: { count: 0 }, reversedPieces: 0 });
    expect(summary.tokunaga.a).not.toBeNull();
    expectClose(summary.tokunaga.c!, 2, 1e-9); // T_k = 1·2^(k−1) exactly (Tokunaga 1978)
    expectClose(summary.tokunaga.a!, 1, 1e-9);
    const d = summary.dimension as { raw: number };
    expectClose(d.raw, Math.log(3.649505) / Math.log(2), 1e-5); // D = ln R_B / ln R_L (La Barbera & Rosso 1989)
  });

  test("reversed digitisation, shuffled features and lines split in two change no result (invariants)", async () => {
    const reference = analysis((await runNetwork({ geojson: featureCollection(tokDoc.features, tokDoc.crs) }, { ...params, outlet: tokDoc.outlet })).summary);
    const reversedLines = tokDoc.features.map((l) => [...l].reverse());
    const random = mulberry32(7);
    const shuffled = [...tokDoc.features];
    for (let i = shuffled.length - 1; i > 0; i--) { const j = Math.floor(random() * (i + 1)); [shuffled[i], shuffled[j]] = [shuffled[j], shuffled[i]]; }
    const split = tokDoc.features.flatMap((l) => [l.slice(0, 2), l.slice(1)]);
    for (const [name, lines] of [["reversed", reversedLines], ["shuffled", shuffled], ["split", split]] as const) {
      const { summary } = await runNetwork({ geojson: featureCollection(lines, tokDoc.crs) }, { ...params, outlet: tokDoc.outlet });
      expect(analysis(summary), name).toEqual(reference);
      if (name === "reversed") expect(summary.topology.reversedPieces).toBe(tokDoc.features.length);
    }
  });

  test("a complete binary tree in longitude/latitude gives R_B = 2 exactly (derived, N_ω = 2^(Ω−ω))", async () => {
    const net = binaryTree({ order: 6, outletLengthM: 3200 });
    const { lines, outlets } = planeLayout(net);
    // a local plane about (−5.2°, 40.1°) in metres, taken to lon/lat; counts do not depend on lengths
    const local = proj4(`+proj=aeqd +lat_0=40.1 +lon_0=-5.2 +datum=WGS84 +units=m +no_defs`, LONLAT);
    const features = lines.map((l) => toPairs(l, (x, y) => local.forward([x, y]) as [number, number]));
    const outlet = local.forward(outlets[0]) as [number, number];
    const file = path.join(tmp, "binary.geojson");
    writeFileSync(file, JSON.stringify(featureCollection(features)));
    const { summary, artifacts } = await runNetwork({ path: file }, { ...params, outlet });
    expect(summary.input.crs).toMatchObject({ epsg: 4326, geographic: true, from: "rfc7946" });
    expect(summary.orders.map((o) => o.streams)).toEqual([32, 16, 8, 4, 2, 1]);
    expectClose(summary.horton.bifurcation!.value, 2, 1e-12);
    // lengths are geodesic: each order's total within 0.1 % of 32 × 100 m in the local plane (derived)
    for (const o of summary.orders) expectClose(o.totalLengthM / 3200, 1, 1e-3);
    const geo = JSON.parse(new TextDecoder().decode(artifacts.find((a) => a.name === "network.geojson")!.bytes));
    expect(geo.features).toHaveLength(63);
    expect(geo.features.filter((f: { properties: { strahler: number } }) => f.properties.strahler === 6)).toHaveLength(1);
    expect(geo.features[0].geometry.coordinates[0][0]).toBeLessThan(-5);
  });

  test("a network with one braid is analysed and the removed loop reported at its place (derived)", async () => {
    const at = (x: number, y: number) => [E0 + x, N0 + y] as [number, number];
    const lines: Line[] = [
      [at(0, 200), at(0, 100), at(0, 0)], [at(-100, 300), at(0, 200)], [at(100, 300), at(0, 200)],
      [at(0, 150), at(-20, 150), at(-20, 50), at(0, 50)], // a side channel rejoining the stem: 140 m
    ];
    const outlet = proj4(UTM32, LONLAT).forward(at(0, 0)) as [number, number];
    const { summary, artifacts } = await runNetwork({ geojson: featureCollection(lines, tokDoc.crs) }, { outlet });
    expect(summary.topology.loops.count).toBe(1);
    expectClose(summary.topology.loops.removedLengthM, 140, 1e-9);
    expectClose(summary.topology.loops.locations[0].x - E0, -20, 1e-9);
    expect(summary.orders.map((o) => o.streams)).toEqual([2, 1]);
    expectClose(summary.network.totalLengthM, 200 + 200 * Math.SQRT2, 1e-9);
    const points = JSON.parse(new TextDecoder().decode(artifacts.find((a) => a.name === "topology.geojson")!.bytes)).features;
    expect(points.map((f: { properties: { kind: string } }) => f.properties.kind).sort()).toEqual(["loop-removed", "outlet"]);
  });

  test("a basin polygon gives drainage density as total length over its geodesic area (Horton 1945)", async () => {
    const { summary } = await runNetwork({ geojson: featureCollection(tokDoc.features, tokDoc.crs) }, {
      ...params, outlet: tokDoc.outlet, basin: { type: "Polygon", coordinates: [[[8.9, 45.1], [9.1, 45.1], [9.1, 45.2], [8.9, 45.2], [8.9, 45.1]]] },
    });
    const dd = summary.drainageDensity!;
    expectClose(dd.totalLengthKm, 34.1, 1e-9); // 341 links of 100 m
    expectClose(dd.valuePerKm, dd.totalLengthKm / dd.basinAreaKm2, 1e-12);
    expect(dd.basinAreaKm2).toBeGreaterThan(150); // 0.2° × 0.1° near 45° N is about 175 km² (derived)
    expect(dd.basinAreaKm2).toBeLessThan(200);
    expectClose(summary.horton.area!.value, 4.261827, 1e-6); // a constant area scale leaves R_A unchanged (derived)
  });
});

describe("runNetwork() inputs and parameters", () => {
  const at = (x: number, y: number) => [E0 + x, N0 + y] as [number, number];
  /** the stem (0,200)→(0,0) and two sources joining at (0,200), digitised downstream */
  const tree: Line[] = [[at(0, 200), at(0, 100), at(0, 0)], [at(-100, 300), at(0, 200)], [at(100, 300), at(0, 200)]];
  const utmCrs = { crs: { type: "name", properties: { name: "EPSG:32632" } } };

  test("with a DEM and no outlet each part drains to its lowest end, and links get drops (derived)", async () => {
    // z = 100 + y/10 on 10 m cells: the lowest line end is (0, 0)
    const width = 40, height = 50, cell = 10;
    const data = new Float32Array(width * height);
    for (let r = 0; r < height; r++) for (let c = 0; c < width; c++) data[r * width + c] = 100 + (400 - (r + 0.5) * cell) / 10;
    const demPath = path.join(tmp, "plane.tif");
    await writeGeoTiff(demPath, { data, width, height }, { crs: crsFromEpsg(32632), transform: { originX: E0 - 200, originY: N0 + 400, pixelSizeX: cell, pixelSizeY: cell }, rasterType: "PixelIsArea" });
    const reversedTree = tree.map((l) => [...l].reverse());
    const { summary } = await runNetwork({ geojson: featureCollection(reversedTree, utmCrs), demPath }, {});
    expect(summary.topology.outlets[0]).toMatchObject({ x: E0, y: N0, rule: "lowest-end" });
    expect(summary.topology.reversedPieces).toBe(3);
    // the order-2 stem falls 20 m over 200 m; nearest-cell sampling is within half a cell, 0.5 m (derived)
    expectClose(summary.orders[1].meanSlope!, 0.1, 0.5 / 200 * 2);
  });

  test("a zipped Shapefile with a flow-direction field gives the outlet and counts the lines digitised upstream (derived)", async () => {
    const lines = [tree[0], [...tree[1]].reverse(), tree[2]];
    const doc = { type: "FeatureCollection", features: lines.map((coordinates, i) => ({ type: "Feature", properties: { dir: i === 1 ? -1 : 1 }, geometry: { type: "LineString", coordinates } })) };
    writeFileSync(path.join(tmp, "dir.geojson"), JSON.stringify(doc));
    execFileSync("ogr2ogr", ["-f", "ESRI Shapefile", "-a_srs", "EPSG:32632", path.join(tmp, "dir.shp"), path.join(tmp, "dir.geojson")]);
    const zip = new yazl.ZipFile();
    for (const ext of ["shp", "shx", "dbf", "prj"]) zip.addFile(path.join(tmp, `dir.${ext}`), `dir.${ext}`);
    zip.end();
    const parts: Buffer[] = [];
    for await (const part of zip.outputStream as AsyncIterable<Buffer>) parts.push(part);
    const zipPath = path.join(tmp, "dir.zip");
    writeFileSync(zipPath, Buffer.concat(parts));
    const { summary } = await runNetwork({ zipPath }, { flowDirectionField: "dir" });
    expect(summary.input.crs).toMatchObject({ from: "prj", geographic: false });
    expect(summary.topology).toMatchObject({ reversedPieces: 1, attributeConflicts: 0 });
    expect(summary.topology.outlets[0]).toMatchObject({ x: E0, y: N0, rule: "digitising" });
    await expect(runNetwork({ zipPath }, { flowDirectionField: "nope" })).rejects.toThrow(/no feature has the property "nope"/);
  });

  test("separate parts are pooled in the Horton table and each also gets its own ratios (derived)", async () => {
    const lines = [...tree, [at(5000, 100), at(5000, 0)]];
    const { summary } = await runNetwork({ geojson: featureCollection(lines, utmCrs) }, {});
    expect(summary.topology.components).toMatchObject({ count: 2, analysed: 2 });
    expect(summary.orders.map((o) => o.streams)).toEqual([3, 1]);
    expect(summary.components.map((c) => [c.links, c.highestOrder, c.bifurcationRatio])).toEqual([[3, 2, 2], [1, 1, null]]);
    expectClose(summary.components[1].totalLengthM, 100, 1e-9);
    const largest = await runNetwork({ geojson: featureCollection(lines, utmCrs) }, { components: "largest" });
    expect(largest.summary.orders.map((o) => o.streams)).toEqual([2, 1]);
  });

  test("the parameters schema applies its defaults and refuses values out of bounds (STANDARDS.md: validation failures are 422)", () => {
    expect(networkParamsSchema.parse({})).toMatchObject({ snapToleranceM: 1, outletRadiusM: 100, components: "each", confidence: 0.95 });
    expect(networkParamsSchema.safeParse({ snapToleranceM: -1 }).success).toBe(false);
    expect(networkParamsSchema.safeParse({ outlet: [200, 0] }).success).toBe(false);
    expect(networkParamsSchema.safeParse({ idField: "id" }).success).toBe(false);
    expect(networkParamsSchema.safeParse({ unknown: 1 }).success).toBe(false);
  });

  test("an aborted signal stops the run, progress rises to the output stage and the summary is deterministic (common practice)", async () => {
    const controller = new AbortController();
    controller.abort();
    await expect(runNetwork({ geojson: featureCollection(tree, utmCrs) }, {}, { signal: controller.signal })).rejects.toThrow(/abort/i);
    const seen: string[] = [];
    const first = await runNetwork({ geojson: featureCollection(tree, utmCrs) }, {}, { onProgress: (stage, f) => seen.push(`${stage}:${f}`) });
    expect(seen[0]).toBe("read:0");
    expect(seen[seen.length - 1]).toBe("output:1");
    // deterministic: a second run gives the same summary, byte for byte (no timings in it)
    const second = await runNetwork({ geojson: featureCollection(tree, utmCrs) }, {});
    expect(JSON.stringify(second.summary)).toBe(JSON.stringify(first.summary));
    expect(first.summary.topology.dangleLengthM).toBe(1); // the default dangle length is the snapping tolerance
  });
});

describe("round trip through the drainage pipeline", () => {
  type StreamFeature = { properties: { id: number; downstream: number; lengthM: number }; geometry: { coordinates: [number, number][] } };
  /** The drainage network as its GeoJSON states it, less the links of one cell (one position: not a line in
   *  RFC 7946 §3.1.4), whose inflows then become outlets, as they do when the lines are read back. */
  function statedNetwork(features: StreamFeature[]): StreamNetwork {
    const single = new Set(features.filter((f) => f.geometry.coordinates.every(([x, y]) => x === f.geometry.coordinates[0][0] && y === f.geometry.coordinates[0][1])).map((f) => f.properties.id));
    const kept = features.filter((f) => !single.has(f.properties.id));
    const index = new Map(kept.map((f, i) => [f.properties.id, i]));
    return {
      crs: LONLAT,
      links: kept.map((f, i) => ({ id: i, downstream: index.get(f.properties.downstream) ?? -1, path: new Float64Array(0), lengthM: f.properties.lengthM, dropM: NaN, areaM2: NaN })),
    };
  }

  for (const dem of ["elev.tif", "jacksboro.tif"]) {
    test(`the streams of ${dem} (r-cran-terra, Debian) exported as GeoJSON and read back keep their per-order counts and lengths within the 1 m snapping tolerance (derived)`, async () => {
      const demPath = path.join(import.meta.dirname, "../../fixtures/cache/debian", dem);
      const drainage = await runDrainage({ demPath, outDir: tmp }, { channelThreshold: { method: "area", km2: 1 } });
      const streams = drainage.artifacts.find((a) => a.name === "streams.geojson")!;
      const doc = JSON.parse(new TextDecoder().decode(streams.bytes)) as { features: StreamFeature[] };
      const expected = hortonTable(strahlerStreams(statedNetwork(doc.features)));
      const { summary } = await runNetwork({ geojson: doc }, { snapToleranceM: 1 });
      expect(summary.topology).toMatchObject({ snappedEndpoints: 0, midLineJunctions: 0, reversedPieces: 0, loops: { count: 0 } });
      expect(summary.orders.map((o) => o.streams)).toEqual(expected.map((r) => r.streamCount));
      summary.orders.forEach((o, k) => expectClose(o.meanLengthM, expected[k].meanLengthM, 1));
    });
  }
});

describe("npm run analyze -- network", () => {
  test("takes --outlet=LON,LAT with a negative longitude and writes the summary and the ordered GeoJSON (node:util parseArgs)", () => {
    const net = binaryTree({ order: 3, outletLengthM: 400 });
    const { lines, outlets } = planeLayout(net);
    const local = proj4(`+proj=aeqd +lat_0=40.1 +lon_0=-5.2 +datum=WGS84 +units=m +no_defs`, LONLAT);
    const file = path.join(tmp, "cli.geojson");
    writeFileSync(file, JSON.stringify(featureCollection(lines.map((l) => toPairs(l, (x, y) => local.forward([x, y]) as [number, number])))));
    const [lon, lat] = local.forward(outlets[0]);
    const out = path.join(tmp, "cli-out");
    const root = path.join(import.meta.dirname, "../../..");
    const stdout = execFileSync(process.execPath, [path.join(root, "node_modules/tsx/dist/cli.mjs"), path.join(root, "scripts/analyze.ts"), "network", file, `--outlet=${lon},${lat}`, "--out", out, "--snap-tolerance", "0.01"], { cwd: root, encoding: "utf8" });
    expect(stdout).toMatch(/7 links, highest order 3/);
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8")) as NetworkSummary;
    expect(summary.params.outlet![0]).toBeLessThan(-5);
    expect(summary.topology.outlets[0].rule).toBe("point");
    expect(JSON.parse(readFileSync(path.join(out, "network.geojson"), "utf8")).features).toHaveLength(7);
    expect(readFileSync(path.join(out, "orders.csv"), "utf8").split("\n")[1]).toMatch(/^1,4,4,/);
  });

  test("exits with 1 and says why when the file holds polygons (derived)", () => {
    const file = path.join(tmp, "polygon.geojson");
    writeFileSync(file, JSON.stringify({ type: "FeatureCollection", features: [{ type: "Feature", properties: {}, geometry: { type: "Polygon", coordinates: [[[0, 0], [1, 0], [1, 1], [0, 0]]] } }] }));
    const root = path.join(import.meta.dirname, "../../..");
    const run = spawnSync(process.execPath, [path.join(root, "node_modules/tsx/dist/cli.mjs"), path.join(root, "scripts/analyze.ts"), "network", file], { cwd: root, encoding: "utf8" });
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/feature 0 is a Polygon, not lines/);
  });
});
