import { describe, expect, it } from "vitest";
import geodesicModule from "geographiclib-geodesic";
import { makeGrid } from "@/lib/raster/grid";
import { geographicCellGeometry, projectedCellGeometry, type CellGeometry } from "@/lib/raster/cell-geometry";
import { d8Directions, d8StepLengths } from "@/lib/hydro/d8";
import { NO_FLOW } from "@/lib/hydro/neighbours";
import { priorityFlood } from "@/lib/hydro/priority-flood";
import { resolveFlats } from "@/lib/hydro/flats";
import { expectClose } from "@/tests/helpers/expect-close";
import { flatWithOneOutlet, plane, randomDem, rotateClockwise } from "@/tests/unit/hydro/dem-fixtures";

const E = 0, SE = 1, N = 6, NE = 7;
const unit = (h: number) => projectedCellGeometry(h, 1, 1);

/** The single direction code of all interior cells, or −1 when they disagree. */
function interiorCode(dir: Uint8Array, w: number, h: number): number {
  const first = dir[w + 1];
  for (let y = 1; y < h - 1; y++) for (let x = 1; x < w - 1; x++) if (dir[y * w + x] !== first) return -1;
  return first;
}

describe("d8Directions()", () => {
  // On square cells E wins while cos θ > (cos θ + sin θ)/√2, i.e. tan θ < √2 − 1, θ < 22.5° (derived).
  it("drains a plane falling 22.4° north of east to E on square cells (derived: tan θ = √2 − 1 at the switch)", () => {
    const dir = d8Directions(plane(9, 9, 22.4), unit(9)).data;
    expect(interiorCode(dir, 9, 9)).toBe(E);
  });

  it("drains a plane falling 22.6° north of east to NE on square cells (derived)", () => {
    const dir = d8Directions(plane(9, 9, 22.6), unit(9)).data;
    expect(interiorCode(dir, 9, 9)).toBe(NE);
  });

  it("drains a plane falling 22.4° and 22.6° south of east to E and SE (derived, mirror image)", () => {
    expect(interiorCode(d8Directions(plane(9, 9, -22.4), unit(9)).data, 9, 9)).toBe(E);
    expect(interiorCode(d8Directions(plane(9, 9, -22.6), unit(9)).data, 9, 9)).toBe(SE);
  });

  // Cells 30 m wide and 10 m tall: the diagonal is √(30² + 10²) m, not √2·30 m. E gives way to NE when
  // tan θ > (√(dx² + dy²) − dx)/dy and NE to N when tan θ > dx/(√(dx² + dy²) − dy) (derived).
  it("on 30 m × 10 m cells switches E → NE at atan((√1000 − 30)/10) ≈ 9.22° (derived)", () => {
    const switchDeg = (Math.atan((Math.sqrt(1000) - 30) / 10) * 180) / Math.PI;
    expectClose(switchDeg, 9.2175, 1e-4);
    const geometry = projectedCellGeometry(9, 30, 10);
    expect(interiorCode(d8Directions(plane(9, 9, switchDeg - 0.2, 30, 10), geometry).data, 9, 9)).toBe(E);
    expect(interiorCode(d8Directions(plane(9, 9, switchDeg + 0.2, 30, 10), geometry).data, 9, 9)).toBe(NE);
    // with the square-cell diagonal √2·30 m, NE would need tan θ > (√2·30 − 30)/10 ≈ 1.24, i.e. 51°
  });

  it("on 30 m × 10 m cells switches NE → N at atan(30/(√1000 − 10)) ≈ 54.22° (derived)", () => {
    const switchDeg = (Math.atan(30 / (Math.sqrt(1000) - 10)) * 180) / Math.PI;
    expectClose(switchDeg, 54.2175, 1e-4);
    const geometry = projectedCellGeometry(9, 30, 10);
    expect(interiorCode(d8Directions(plane(9, 9, switchDeg - 0.2, 30, 10), geometry).data, 9, 9)).toBe(NE);
    expect(interiorCode(d8Directions(plane(9, 9, switchDeg + 0.2, 30, 10), geometry).data, 9, 9)).toBe(N);
  });

  it("makes the downslope edge cells of a plane outlets and the others drain inwards (derived)", () => {
    const dir = d8Directions(plane(6, 4, 0), unit(4)).data;
    for (let y = 0; y < 4; y++) {
      expect(dir[y * 6 + 5]).toBe(NO_FLOW);
      expect(dir[y * 6]).toBe(E);
    }
  });

  it("turns every direction code by +2 when the DEM turns 90° clockwise (invariant)", () => {
    for (let seed = 1; seed <= 4; seed++) {
      const dem = randomDem(23, 17, seed, 0.05, false);
      const turned = rotateClockwise(dem);
      const dir = d8Directions(dem, unit(17));
      const dirTurned = d8Directions(turned, unit(23));
      const expected = rotateClockwise(dir).data.map((k) => (k === NO_FLOW ? NO_FLOW : (k + 2) & 7));
      expect(Array.from(dirTurned.data)).toEqual(Array.from(expected));
    }
  });

  it("routes a flat with one outlet by its increments so every interior cell drains, elevations untouched (Barnes et al. 2014)", () => {
    const dem = flatWithOneOutlet();
    const before = Float32Array.from(dem.data);
    const flats = resolveFlats(dem);
    const dir = d8Directions(dem, unit(7), { flatIncrements: flats.increments }).data;
    expect(Array.from(dem.data)).toEqual(Array.from(before));
    for (let i = 0; i < dir.length; i++) expect(dir[i] === NO_FLOW).toBe(i === 3 * 9);
  });

  it("leaves a flat without increments as NO_FLOW cells (derived)", () => {
    const dir = d8Directions(flatWithOneOutlet(), unit(7)).data;
    expect(dir[4 * 9 + 4]).toBe(NO_FLOW);
  });

  it("gives nodata NO_FLOW and drains a cell next to a hole to its lower valid neighbour (derived)", () => {
    const dem = makeGrid(Float32Array.of(3, 2, NaN, 4, 3, NaN, 5, 4, 3), 3, 3);
    const dir = d8Directions(dem, unit(3)).data;
    expect(dir[2]).toBe(NO_FLOW);
    expect(dir[4]).toBe(6); // centre 3 → N neighbour 2 at distance 1 beats NE (nodata) and W/SW (higher)
  });

  it("on a 1×1 DEM and a DEM fully of nodata gives only NO_FLOW (derived)", () => {
    expect(Array.from(d8Directions(makeGrid(Float32Array.of(1), 1, 1), unit(1)).data)).toEqual([NO_FLOW]);
    const empty = d8Directions(makeGrid(new Float32Array(6).fill(NaN), 3, 2), unit(2)).data;
    expect(Array.from(empty).every((k) => k === NO_FLOW)).toBe(true);
  });

  it("after Priority-Flood and flat resolution leaves no NO_FLOW cell inside a random DEM with holes (invariant)", () => {
    for (let seed = 5; seed <= 8; seed++) {
      const dem = randomDem(31, 29, seed, 0.04);
      priorityFlood(dem);
      const flats = resolveFlats(dem);
      expect(flats.unresolvedFlats).toBe(0);
      const dir = d8Directions(dem, unit(29), { flatIncrements: flats.increments }).data;
      const z = dem.data;
      for (let y = 1; y < 28; y++) {
        for (let x = 1; x < 30; x++) {
          const i = y * 31 + x;
          if (dir[i] !== NO_FLOW || z[i] !== z[i]) continue;
          const nearHole = [-32, -31, -30, -1, 1, 30, 31, 32].some((o) => z[i + o] !== z[i + o]);
          expect(nearHole, `cell (${x}, ${y}) is NO_FLOW away from nodata`).toBe(true);
        }
      }
    }
  });

  it("rejects cell geometry with the wrong number of rows", () => {
    expect(() => d8Directions(plane(3, 3, 0), unit(4))).toThrow(RangeError);
  });
});

describe("d8StepLengths()", () => {
  it("uses dx, the mean of two row heights and the hypotenuse with the mean width on per-row geometry (derived)", () => {
    const geometry: CellGeometry = {
      dx: Float64Array.of(100, 80, 60),
      dy: Float64Array.of(110, 112, 114),
      area: Float64Array.of(11000, 8960, 6840),
      geographic: true,
    };
    const s = d8StepLengths(geometry, 1);
    expect(s[0]).toBe(80);
    expect(s[4]).toBe(80);
    expect(s[6]).toBe(111); // N: (110 + 112)/2
    expect(s[2]).toBe(113); // S: (112 + 114)/2
    expectClose(s[7], Math.hypot(90, 111), 1e-12);
    expectClose(s[5], Math.hypot(90, 111), 1e-12);
    expectClose(s[1], Math.hypot(70, 113), 1e-12);
    expectClose(s[3], Math.hypot(70, 113), 1e-12);
  });

  it("on a projected 30 m grid gives 30 m and 30√2 m (derived)", () => {
    const s = d8StepLengths(projectedCellGeometry(2, 30, 30), 0);
    expect(Array.from(s.filter((_, k) => k % 2 === 0))).toEqual([30, 30, 30, 30]);
    for (let k = 1; k < 8; k += 2) expectClose(s[k], 30 * Math.SQRT2, 1e-12);
  });
});

const { Geodesic } = geodesicModule as unknown as {
  Geodesic: { WGS84: { Inverse(lat1: number, lon1: number, lat2: number, lon2: number): { s12: number } } };
};

describe("d8StepLengths() on geographic rows against geographiclib-geodesic (Karney 2013)", () => {
  // Tolerance, derived: the planar steps differ from the geodesic by a relative O(Δφ²) (d8StepLengths'
  // comment), Δφ² = 2.1e-10 for 3″ and 2.4e-11 for 1″ cells; the cell-centre latitudes, held in degrees,
  // carry a rounding of about ε·φ/Δφ ≈ 6e-11 of a 1″ step at 70°. 1e-9 is a few times both, and a
  // diagonal that used one row's width instead of the two rows' mean would miss it by ~1e-5 at 45°–70°.
  const REL = 1e-9;
  for (const seconds of [1, 3]) {
    for (const lat of [0, 45, 70]) {
      it(`matches the geodesic between cell centres on ${seconds}″ rows at ${lat}° in all eight directions (relative ${REL})`, () => {
        const d = seconds / 3600, origin = lat + 1.5 * d; // three rows, the middle one centred on lat
        const steps = d8StepLengths(geographicCellGeometry(3, origin, d, d), 1);
        const centreLat = (row: number) => origin - (row + 0.5) * d;
        // codes 0–7 = E, SE, S, SW, W, NW, N, NE; rows go south (lib/hydro/neighbours.ts)
        const to: [number, number][] = [[1, 0], [1, 1], [0, 1], [-1, 1], [-1, 0], [-1, -1], [0, -1], [1, -1]];
        to.forEach(([dx, dy], k) => {
          const geodesic = Geodesic.WGS84.Inverse(centreLat(1), 0, centreLat(1 + dy), dx * d).s12;
          expectClose(steps[k] / geodesic, 1, REL);
        });
      });
    }
  }
});
