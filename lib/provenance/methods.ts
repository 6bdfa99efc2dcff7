// The published methods that produced a job's numbers, cited by name and paper in its provenance document:
// chosen from the job's own parameters and input, with each paper as the implementing module's first lines cite it.
import type { z } from "zod";
import type { JobKind } from "@/lib/jobs/kinds";
import { drainageParamsSchema } from "@/lib/pipelines/drainage";
import { lineParamsSchema } from "@/lib/pipelines/line";
import { networkParamsSchema } from "@/lib/pipelines/network";
import { surfaceParamsSchema } from "@/lib/pipelines/surface";

export interface Paper {
  /** as the source names them, e.g. "Barnes, Lehman & Mulla" */
  authors: string;
  year: number;
  /** journal with volume and pages, report or book */
  reference: string;
}

export interface MethodCitation {
  name: string;
  papers: readonly Paper[];
}

/** What the methods depend on beyond the parameters: whether the input's coordinates were longitude/latitude. */
export interface MethodInput {
  geographic: boolean;
}

const paper = (authors: string, year: number, reference: string): Paper => ({ authors, year, reference });
const method = (name: string, ...papers: Paper[]): MethodCitation => ({ name, papers });

const BARNES_FILL = paper("Barnes, Lehman & Mulla", 2014, "Computers & Geosciences 62:117–127");
const O_CALLAGHAN_MARK = paper("O'Callaghan & Mark", 1984, "Computer Vision, Graphics, and Image Processing 28(3):323–344");
const HORTON = paper("Horton", 1945, "Geol. Soc. Am. Bull. 56(3):275–370");
const MARK_ARONSON = paper("Mark & Aronson", 1984, "Math. Geol. 16(7):671–683");
const HUANG_TURCOTTE = paper("Huang & Turcotte", 1989, "J. Geophys. Res. 94(B6)");
const KARNEY = paper("Karney", 2013, "J. Geod. 87:43–55");

const PRIORITY_FLOOD = method("Priority-Flood depression filling with the plain queue (Alg. 2)", BARNES_FILL);
const PRIORITY_FLOOD_EPSILON = method("Priority-Flood+Epsilon depression filling, a minimal gradient across flats (Alg. 3)", BARNES_FILL);
const FLAT_RESOLUTION = method("Flat resolution towards lower and away from higher terrain", paper("Barnes, Lehman & Mulla", 2014, "Computers & Geosciences 62:128–135"));
const D8 = method("D8 flow directions", O_CALLAGHAN_MARK);
const CELL_AREAS = method("Cell areas on the WGS84 ellipsoid", paper("Snyder", 1987, "Map Projections — A Working Manual, USGS PP 1395, eq. 3-12"));
const AREA_THRESHOLD = method("Channels at a contributing-area threshold", O_CALLAGHAN_MARK);
const CONSTANT_DROP = method("Channel threshold by the constant drop law",
  paper("Broscoe", 1959, "Columbia Univ. Tech. Rep. 18 (ONR)"), paper("Tarboton, Bras & Rodríguez-Iturbe", 1991, "Hydrol. Process. 5:81–100"));
const GEODESIC_LENGTHS = method("Geodesic lengths on the WGS84 ellipsoid", KARNEY);
const GEODESIC_AREA = method("Geodesic area of the basin outline", KARNEY);

const STRAHLER = method("Strahler stream order", paper("Strahler", 1952, "Geol. Soc. Am. Bull. 63:1117–1142"), paper("Strahler", 1957, "Trans. AGU 38(6):913–920"));
const SHREVE = method("Shreve magnitude", paper("Shreve", 1966, "Statistical law of stream numbers, J. Geol. 74(1):17–37"));
const HORTON_LAWS = method("Horton's laws of stream numbers, lengths, slopes and areas", HORTON, paper("Schumm", 1956, "Geol. Soc. Am. Bull. 67(5):597–646"));
const HACK = method("Hack's law", paper("Hack", 1957, "Studies of longitudinal stream profiles in Virginia and Maryland, USGS Prof. Paper 294-B"));
const TOKUNAGA = method("Tokunaga self-similarity",
  paper("Tokunaga", 1978, "Geophys. Bull. Hokkaido Univ. 25:1–19"), paper("Peckham", 1995, "WRR 31(4):1023–1029"), paper("Tarboton", 1996, "J. Hydrol. 187:105–117"));
const NETWORK_DIMENSION = method("Network fractal dimension",
  paper("Tarboton, Bras & Rodríguez-Iturbe", 1988, "WRR 24(8):1317–1322"), paper("La Barbera & Rosso", 1989, "WRR 25(4):735–741"));
const DRAINAGE_DENSITY = method("Drainage density", HORTON);

const DIVIDER = method("Divider (ruler) dimension", paper("Richardson", 1961, "General Systems Yearbook 6:139–187"), paper("Mandelbrot", 1967, "Science 156:636–638"));
const BOX_COUNTING = method("Box-counting dimension", paper("Falconer", 2003, "Fractal Geometry, 2nd ed., Wiley"));

const SEMIVARIOGRAM = method("Semivariogram dimension", MARK_ARONSON);
const CUBE_COUNTING = method("Differential box counting", paper("Sarkar & Chaudhuri", 1994, "IEEE Trans. Syst. Man Cybern. 24(1):115–120"));
const POWER_SPECTRUM = method("Power spectrum dimension", paper("Voss", 1988, "in The Science of Fractal Images"), HUANG_TURCOTTE);
const TRIANGULAR_PRISM = method("Triangular prism surface area", paper("Clarke", 1986, "Computers & Geosciences 12(5):713–722"));
const LOCAL_DIMENSION = method("Local semivariogram dimension in moving windows", MARK_ARONSON);
const TRANSECTS = method("Transect dimension by the semivariogram and the power spectrum", MARK_ARONSON, HUANG_TURCOTTE);

/** The surface estimators in the order the pipeline runs them, each with its method. */
const SURFACE_METHOD: Record<z.output<typeof surfaceParamsSchema>["estimators"][number], MethodCitation> = {
  variogram: SEMIVARIOGRAM, "cube-counting": CUBE_COUNTING, "power-spectrum": POWER_SPECTRUM,
  "triangular-prism": TRIANGULAR_PRISM, "local-dimension": LOCAL_DIMENSION, profiles: TRANSECTS,
};
const LINE_METHOD: Record<z.output<typeof lineParamsSchema>["estimators"][number], MethodCitation> = {
  divider: DIVIDER, "box-counting": BOX_COUNTING,
};

/** Present only the chosen estimators, in the pipeline's order (not the user's), so equal choices cite alike. */
function chosen<K extends string>(table: Record<K, MethodCitation>, estimators: readonly K[]): MethodCitation[] {
  const run = new Set(estimators);
  return (Object.keys(table) as K[]).filter((k) => run.has(k)).map((k) => table[k]);
}

function drainageMethods(raw: Record<string, unknown>, input: MethodInput): MethodCitation[] {
  const p = drainageParamsSchema.parse(raw);
  return [
    ...(p.epsilonFill ? [PRIORITY_FLOOD_EPSILON] : [PRIORITY_FLOOD, FLAT_RESOLUTION]),
    D8,
    ...(input.geographic ? [CELL_AREAS] : []),
    p.channelThreshold.method === "constant-drop" ? CONSTANT_DROP : AREA_THRESHOLD,
    STRAHLER, SHREVE, HORTON_LAWS, HACK, TOKUNAGA, NETWORK_DIMENSION, DRAINAGE_DENSITY,
  ];
}

function networkMethods(raw: Record<string, unknown>, input: MethodInput): MethodCitation[] {
  const p = networkParamsSchema.parse(raw);
  return [
    ...(input.geographic ? [GEODESIC_LENGTHS] : []),
    STRAHLER, SHREVE, HORTON_LAWS, TOKUNAGA, HACK, NETWORK_DIMENSION,
    // drainage density needs the basin outline, whose area is geodesic (it is given in lon/lat)
    ...(p.basin ? [GEODESIC_AREA, DRAINAGE_DENSITY] : []),
    DIVIDER, BOX_COUNTING,
  ];
}

/**
 * The methods a job of `kind` ran with `params` (the stored canonical parameters, defaults filled in) on an
 * input described by `input`, in the order the pipeline runs them. Throws the schema's error for parameters
 * the kind would not accept.
 */
export function methodsOf(kind: JobKind, params: Record<string, unknown>, input: MethodInput): MethodCitation[] {
  switch (kind) {
    case "drainage": return drainageMethods(params, input);
    case "network": return networkMethods(params, input);
    case "surface": return chosen(SURFACE_METHOD, surfaceParamsSchema.parse(params).estimators);
    case "line": {
      const p = lineParamsSchema.parse(params);
      return [...(input.geographic ? [GEODESIC_LENGTHS] : []), ...chosen(LINE_METHOD, p.estimators)];
    }
  }
}

/**
 * Whether a job's input was in longitude/latitude, as its result summary states it: each pipeline reports
 * that in its own place (drainage and network the CRS, surface the cell geometry, line the coordinates).
 */
export function geographicInput(kind: JobKind, summary: Record<string, unknown>): boolean {
  const input = (summary.input ?? {}) as { crs?: { geographic?: unknown } | null; geographic?: unknown; coordinates?: unknown };
  const flag = kind === "surface" ? input.geographic
    : kind === "line" ? (typeof input.coordinates === "string" ? input.coordinates === "lonlat" : undefined)
    : input.crs?.geographic;
  if (typeof flag !== "boolean") throw new RangeError(`the ${kind} result summary does not say whether its input was geographic`);
  return flag;
}
