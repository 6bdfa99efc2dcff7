import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { geographicInput, methodsOf, type MethodCitation } from "@/lib/provenance/methods";

const PROJECTED = { geographic: false };
const LONLAT = { geographic: true };
const names = (ms: MethodCitation[]) => ms.map((m) => m.name);
const byName = (ms: MethodCitation[], name: string) => ms.find((m) => m.name === name);

const AREA = { channelThreshold: { method: "area", km2: 1 } };
const CONSTANT_DROP = { channelThreshold: { method: "constant-drop" } };
const BASIN = { type: "Polygon", coordinates: [[[6, 49.5], [6.1, 49.5], [6.1, 49.6], [6, 49.5]]] };

const CONSTANT_DROP_NAME = "Channel threshold by the constant drop law";
const AREA_NAME = "Channels at a contributing-area threshold";
const FILL_NAME = "Priority-Flood depression filling with the plain queue (Alg. 2)";
const EPSILON_NAME = "Priority-Flood+Epsilon depression filling, a minimal gradient across flats (Alg. 3)";
const FLATS_NAME = "Flat resolution towards lower and away from higher terrain";
const SURFACE_NAMES = {
  variogram: "Semivariogram dimension",
  "cube-counting": "Differential box counting",
  "power-spectrum": "Power spectrum dimension",
  "triangular-prism": "Triangular prism surface area",
  "local-dimension": "Local semivariogram dimension in moving windows",
  profiles: "Transect dimension by the semivariogram and the power spectrum",
} as const;

describe("methodsOf() for drainage jobs", () => {
  it("cites the constant drop law (Broscoe 1959; Tarboton, Bras & Rodríguez-Iturbe 1991) only when the automatic threshold ran, the area threshold (O'Callaghan & Mark 1984) otherwise (lib/pipelines/drainage.ts)", () => {
    const auto = methodsOf("drainage", CONSTANT_DROP, PROJECTED);
    const fixed = methodsOf("drainage", AREA, PROJECTED);
    expect(byName(auto, CONSTANT_DROP_NAME)?.papers.map((p) => [p.authors, p.year])).toEqual([["Broscoe", 1959], ["Tarboton, Bras & Rodríguez-Iturbe", 1991]]);
    expect(names(auto)).not.toContain(AREA_NAME);
    expect(names(fixed)).toContain(AREA_NAME);
    expect(names(fixed)).not.toContain(CONSTANT_DROP_NAME);
    // the rest of the pipeline is the same either way (derived)
    expect(names(auto).filter((n) => n !== CONSTANT_DROP_NAME)).toEqual(names(fixed).filter((n) => n !== AREA_NAME));
  });

  it("cites flat resolution (Barnes, Lehman & Mulla 2014, C&G 62:128–135) without epsilon fill and the epsilon variant (their Alg. 3) with it, never both", () => {
    const flats = names(methodsOf("drainage", { ...AREA, epsilonFill: false }, PROJECTED));
    const epsilon = names(methodsOf("drainage", { ...AREA, epsilonFill: true }, PROJECTED));
    expect(flats.slice(0, 2)).toEqual([FILL_NAME, FLATS_NAME]);
    expect(flats).not.toContain(EPSILON_NAME);
    expect(epsilon[0]).toBe(EPSILON_NAME);
    expect(epsilon).not.toContain(FLATS_NAME);
    expect(epsilon).not.toContain(FILL_NAME);
    // epsilonFill defaults to false in the drainage schema, so leaving it out cites flat resolution (lib/pipelines/drainage.ts)
    expect(names(methodsOf("drainage", AREA, PROJECTED))).toEqual(flats);
  });

  it("cites ellipsoidal cell areas (Snyder 1987, eq. 3-12) only on a geographic DEM (lib/raster/cell-geometry.ts)", () => {
    const snyder = (ms: MethodCitation[]) => ms.filter((m) => m.papers.some((p) => p.authors === "Snyder"));
    expect(snyder(methodsOf("drainage", AREA, PROJECTED))).toEqual([]);
    expect(snyder(methodsOf("drainage", AREA, LONLAT)).map((m) => m.name)).toEqual(["Cell areas on the WGS84 ellipsoid"]);
  });

  it("cites the network laws every drainage job computes: Strahler, Shreve, Horton, Hack, Tokunaga, network dimension, drainage density (lib/pipelines/drainage.ts)", () => {
    expect(names(methodsOf("drainage", AREA, PROJECTED)).slice(-7)).toEqual([
      "Strahler stream order", "Shreve magnitude", "Horton's laws of stream numbers, lengths, slopes and areas", "Hack's law",
      "Tokunaga self-similarity", "Network fractal dimension", "Drainage density",
    ]);
  });
});

describe("methodsOf() for surface, line and network jobs", () => {
  it("cites exactly the surface estimators chosen, in the pipeline's order whatever order they were given in (lib/pipelines/surface.ts)", () => {
    const keys = Object.keys(SURFACE_NAMES) as (keyof typeof SURFACE_NAMES)[];
    for (const k of keys) expect(names(methodsOf("surface", { estimators: [k] }, PROJECTED))).toEqual([SURFACE_NAMES[k]]);
    expect(names(methodsOf("surface", { estimators: ["triangular-prism", "variogram"] }, PROJECTED)))
      .toEqual([SURFACE_NAMES.variogram, SURFACE_NAMES["triangular-prism"]]);
    expect(names(methodsOf("surface", { estimators: ["variogram", "triangular-prism"] }, LONLAT)))
      .toEqual([SURFACE_NAMES.variogram, SURFACE_NAMES["triangular-prism"]]);
    // the schema's default runs all six (lib/pipelines/surface.ts)
    expect(names(methodsOf("surface", {}, PROJECTED))).toEqual(keys.map((k) => SURFACE_NAMES[k]));
  });

  it("cites exactly the line estimators chosen, and geodesic lengths (Karney 2013) only for lon/lat lines (lib/pipelines/line.ts, lib/fractal/polylines.ts)", () => {
    expect(names(methodsOf("line", { estimators: ["box-counting"] }, PROJECTED))).toEqual(["Box-counting dimension"]);
    expect(names(methodsOf("line", { estimators: ["divider"] }, PROJECTED))).toEqual(["Divider (ruler) dimension"]);
    expect(names(methodsOf("line", {}, LONLAT))).toEqual(["Geodesic lengths on the WGS84 ellipsoid", "Divider (ruler) dimension", "Box-counting dimension"]);
  });

  it("cites drainage density and the geodesic basin area only when a network job has a basin outline (lib/pipelines/network.ts)", () => {
    const without = names(methodsOf("network", {}, PROJECTED));
    const withBasin = names(methodsOf("network", { basin: BASIN }, PROJECTED));
    expect(without).not.toContain("Drainage density");
    expect(withBasin.filter((n) => !without.includes(n))).toEqual(["Geodesic area of the basin outline", "Drainage density"]);
    expect(without).toEqual(expect.arrayContaining(["Strahler stream order", "Shreve magnitude", "Network fractal dimension", "Hack's law", "Tokunaga self-similarity"]));
  });

  it("refuses parameters the kind's schema refuses, rather than citing what did not run (zod schemas of lib/pipelines)", () => {
    expect(() => methodsOf("drainage", { channelThreshold: { method: "slope-area" } }, PROJECTED)).toThrow();
    expect(() => methodsOf("surface", { estimators: ["fourier"] }, PROJECTED)).toThrow();
  });
});

/** The leading comment block of a module, as one line: the source it cites on its first lines. */
function header(module: string): string {
  const lines = readFileSync(module, "utf8").split("\n");
  const end = lines.findIndex((l) => !l.startsWith("//"));
  return lines.slice(0, end).map((l) => l.replace(/^\/\/\s?/, "")).join(" ").replace(/\s+/g, " ");
}

/** The modules that implement each method; the papers must be cited there, as the module cites them. */
const MODULES: Record<string, string[]> = {
  [FILL_NAME]: ["lib/hydro/priority-flood.ts"],
  [EPSILON_NAME]: ["lib/hydro/priority-flood.ts"],
  [FLATS_NAME]: ["lib/hydro/flats.ts"],
  "D8 flow directions": ["lib/hydro/d8.ts"],
  "Cell areas on the WGS84 ellipsoid": ["lib/raster/cell-geometry.ts"],
  // channels.ts abbreviates the journal; d8.ts names it in full
  [AREA_NAME]: ["lib/hydro/channels.ts", "lib/hydro/d8.ts"],
  [CONSTANT_DROP_NAME]: ["lib/hydro/constant-drop.ts"],
  "Geodesic lengths on the WGS84 ellipsoid": ["lib/raster/geodesy.ts"],
  "Geodesic area of the basin outline": ["lib/raster/geodesy.ts"],
  "Strahler stream order": ["lib/network/strahler.ts"],
  "Shreve magnitude": ["lib/network/shreve.ts"],
  "Horton's laws of stream numbers, lengths, slopes and areas": ["lib/network/horton.ts"],
  "Hack's law": ["lib/network/hack.ts"],
  "Tokunaga self-similarity": ["lib/network/tokunaga.ts"],
  "Network fractal dimension": ["lib/network/dimension.ts"],
  "Drainage density": ["lib/network/drainage-density.ts"],
  "Divider (ruler) dimension": ["lib/fractal/divider.ts"],
  "Box-counting dimension": ["lib/fractal/box-counting.ts"],
  [SURFACE_NAMES.variogram]: ["lib/fractal/variogram.ts"],
  [SURFACE_NAMES["cube-counting"]]: ["lib/fractal/cube-counting.ts"],
  [SURFACE_NAMES["power-spectrum"]]: ["lib/fractal/power-spectrum.ts"],
  [SURFACE_NAMES["triangular-prism"]]: ["lib/fractal/triangular-prism.ts"],
  [SURFACE_NAMES["local-dimension"]]: ["lib/fractal/local-dimension.ts"],
  // profile.ts names Huang & Turcotte without the journal, which power-spectrum.ts gives
  [SURFACE_NAMES.profiles]: ["lib/fractal/profile.ts", "lib/fractal/power-spectrum.ts"],
};

/** Every method any job can cite: the union over parameter choices that switch methods on (derived from the schemas). */
const ALL = [
  ...methodsOf("drainage", CONSTANT_DROP, LONLAT), ...methodsOf("drainage", { ...AREA, epsilonFill: true }, PROJECTED),
  ...methodsOf("drainage", AREA, PROJECTED), ...methodsOf("surface", {}, PROJECTED),
  ...methodsOf("network", { basin: BASIN }, LONLAT), ...methodsOf("line", {}, LONLAT),
];

describe("the citations", () => {
  it("name every paper exactly as the implementing module's header does, \"Authors (year), reference\" or \"Authors year, reference\" (module first lines, STYLE.md)", () => {
    const seen = new Set<string>();
    let papers = 0;
    for (const m of ALL) {
      if (seen.has(m.name)) continue;
      seen.add(m.name);
      const modules = MODULES[m.name];
      expect(modules, `no implementing module listed for "${m.name}"`).toBeDefined();
      const headers = modules.map(header);
      expect(m.papers.length).toBeGreaterThan(0);
      for (const p of m.papers) {
        papers++;
        const forms = [`${p.authors} (${p.year}), ${p.reference}`, `${p.authors} ${p.year}, ${p.reference}`];
        expect(headers.some((h) => forms.some((f) => h.includes(f))), `${m.name}: ${forms[0]} not in ${modules.join(", ")}`).toBe(true);
      }
    }
    // every listed module is one some job cites, so the table cannot drift from methodsOf (derived)
    expect([...seen].sort()).toEqual(Object.keys(MODULES).sort());
    expect(papers).toBeGreaterThanOrEqual(seen.size);
  });
});

describe("geographicInput()", () => {
  it("reads each pipeline's own statement of lon/lat input from its result summary (lib/pipelines/*.ts summaries)", () => {
    expect(geographicInput("drainage", { input: { crs: { epsg: 4326, geographic: true } } })).toBe(true);
    expect(geographicInput("network", { input: { crs: { epsg: 32631, geographic: false } } })).toBe(false);
    expect(geographicInput("surface", { input: { geographic: true, crs: null } })).toBe(true);
    expect(geographicInput("line", { input: { coordinates: "metres" } })).toBe(false);
    expect(geographicInput("line", { input: { coordinates: "lonlat" } })).toBe(true);
  });

  it("refuses a summary that does not say, rather than guessing projected (derived)", () => {
    expect(() => geographicInput("drainage", { input: {} })).toThrow(RangeError);
    expect(() => geographicInput("line", {})).toThrow(RangeError);
  });
});
