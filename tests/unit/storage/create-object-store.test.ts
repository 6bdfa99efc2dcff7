import { describe, expect, it } from "vitest";
import { ZodError } from "zod";
import { createObjectStore, storageConfigFromEnv } from "@/lib/storage/create-object-store";
import { LocalDiskStore } from "@/lib/storage/local-disk";
import { S3Store } from "@/lib/storage/s3";

describe("storageConfigFromEnv()", () => {
  it("defaults to local disk under .data/objects (DESIGN.md: local disk by default)", () => {
    expect(storageConfigFromEnv({})).toEqual({ backend: "local", root: ".data/objects" });
  });

  it("reads the S3 settings, with part size in MiB turned into bytes (derived)", () => {
    const config = storageConfigFromEnv({
      RILLSCALE_STORAGE: "s3", RILLSCALE_S3_BUCKET: "tallow-objects", RILLSCALE_S3_ENDPOINT: "http://127.0.0.1:9000",
      RILLSCALE_S3_FORCE_PATH_STYLE: "1", RILLSCALE_S3_ACCESS_KEY_ID: "id", RILLSCALE_S3_SECRET_ACCESS_KEY: "secret",
      RILLSCALE_S3_PART_SIZE_MIB: "16",
    });
    expect(config).toEqual({
      backend: "s3", bucket: "tallow-objects", region: "us-east-1", endpoint: "http://127.0.0.1:9000", forcePathStyle: true,
      credentials: { accessKeyId: "id", secretAccessKey: "secret" }, partSize: 16 * 1024 * 1024, queueSize: 4,
      checksums: "when_required",
    });
  });

  it("names each bad variable: S3 without a bucket, half a credential pair, parts under 5 MiB (Amazon S3 multipart limits)", () => {
    const issuesOf = (env: Record<string, string>) => {
      try {
        storageConfigFromEnv(env);
      } catch (err) {
        expect(err).toBeInstanceOf(ZodError);
        return (err as ZodError).issues.map((i) => i.path.join("."));
      }
      return [];
    };
    expect(issuesOf({ RILLSCALE_STORAGE: "s3" })).toEqual(["RILLSCALE_S3_BUCKET"]);
    expect(issuesOf({ RILLSCALE_STORAGE: "s3", RILLSCALE_S3_BUCKET: "bkt", RILLSCALE_S3_ACCESS_KEY_ID: "id" }))
      .toEqual(["RILLSCALE_S3_SECRET_ACCESS_KEY"]);
    expect(issuesOf({ RILLSCALE_S3_PART_SIZE_MIB: "4" })).toEqual(["RILLSCALE_S3_PART_SIZE_MIB"]);
    expect(issuesOf({ RILLSCALE_STORAGE: "ftp" })).toEqual(["RILLSCALE_STORAGE"]);
  });
});

describe("createObjectStore()", () => {
  it("builds the adapter the config names (derived)", () => {
    expect(createObjectStore({ backend: "local", root: "/tmp/rillscale-objects" })).toBeInstanceOf(LocalDiskStore);
    const s3 = createObjectStore(storageConfigFromEnv({ RILLSCALE_STORAGE: "s3", RILLSCALE_S3_BUCKET: "bkt" }));
    expect(s3).toBeInstanceOf(S3Store);
    expect(s3.backend).toBe("s3");
  });
});
