import { describe, expect, it } from "vitest";
import { fitPointsCsv, hortonOrdersCsv } from "@/lib/jobs/csv-tables";

describe("csv-tables", () => {
  it("hortonOrdersCsv() writes one CRLF row per order with an empty cell for a missing slope (RFC 4180 §2)", () => {
    const csv = hortonOrdersCsv([
      { order: 1, streamCount: 8, meanLengthM: 120.5, meanAreaKm2: 0.25, meanSlope: 0.01 },
      { order: 2, streamCount: 2, meanLengthM: 300, meanAreaKm2: 1, meanSlope: null },
    ]);
    expect(csv).toBe("order,stream_count,mean_length_m,mean_area_km2,mean_slope_m_per_m\r\n1,8,120.5,0.25,0.01\r\n2,2,300,1,\r\n");
  });

  it("fitPointsCsv() finds every fit in a summary by its JSON Pointer and keeps each point once (derived)", () => {
    const fit = (unit: string) => ({ range: { min: 1, max: 4, unit }, points: [{ scale: 1, measure: 10, used: true }, { scale: 2, measure: 5, used: false }] });
    const csv = fitPointsCsv({ estimators: { divider: { fit: fit("m") }, boxCounting: { fit: fit("m") } }, other: [1, 2] })!;
    const rows = csv.trim().split("\r\n");
    expect(rows[0]).toBe("fit,scale,measure,used,scale_unit");
    expect(rows.slice(1)).toEqual([
      "/estimators/divider/fit,1,10,true,m", "/estimators/divider/fit,2,5,false,m",
      "/estimators/boxCounting/fit,1,10,true,m", "/estimators/boxCounting/fit,2,5,false,m",
    ]);
  });

  it("fitPointsCsv() is null for a summary without fits, and quotes cells holding commas (RFC 4180 §2.6)", () => {
    expect(fitPointsCsv({ a: 1 })).toBeNull();
    expect(fitPointsCsv({ "a,b": { points: [{ scale: 1, measure: 2, used: true }] } })).toContain('"/a,b"');
  });
});
