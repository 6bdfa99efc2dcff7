// A job of our own invented demo scenario (Tallow Creek) for the provenance tests.
import type { ProvJobFacts } from "@/lib/provenance/prov-json";
import { methodsOf } from "@/lib/provenance/methods";

const PARAMS = { channelThreshold: { method: "area", km2: 1 }, epsilonFill: false };

export const FACTS: ProvJobFacts = {
  job: {
    id: "7d3f4a52-0000-4000-8000-000000000001", kind: "drainage", attempts: 1, workerHost: "worker-1", cachedFrom: null,
    startedAt: new Date("2026-12-01T10:00:00.000Z"), finishedAt: new Date("2026-12-01T10:00:42.500Z"),
  },
  dataset: {
    id: "7d3f4a52-0000-4000-8000-0000000000d1", name: "tallow-creek.tif", sha256: "a".repeat(64), mediaType: "image/tiff",
    sizeBytes: 123456, uploadedAt: new Date("2026-12-01T09:58:00.000Z"),
  },
  params: PARAMS,
  artifacts: [
    { name: "streams.geojson", sha256: "b".repeat(64), mediaType: "application/geo+json", sizeBytes: 2048 },
    { name: "orders.tif", sha256: "c".repeat(64), mediaType: "image/tiff; application=geotiff", sizeBytes: 4096 },
  ],
  software: { name: "rillscale", version: "0.1.0", gitCommit: "0123456789abcdef0123456789abcdef01234567" },
  org: { id: "7d3f4a52-0000-4000-8000-0000000000a1", name: "Tallow Creek Watershed Trust" },
  submitter: { kind: "api_key", id: "k1", label: "rs_k1 (demo script)" },
  methods: methodsOf("drainage", PARAMS, { geographic: false }),
};
