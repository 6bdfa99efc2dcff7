import { createHash } from "node:crypto";
import { appendFileSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { FollowingHash } from "@/lib/ingest/following-hash";

const base = mkdtempSync(path.join(tmpdir(), "rillscale-follow-"));
afterAll(() => rmSync(base, { recursive: true, force: true }));
// SHA-256("abc") — FIPS 180-4 example (NIST CSRC "SHA256.pdf").
const ABC_SHA256 = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad";

describe("FollowingHash", () => {
  it("gives the FIPS 180-4 digest of \"abc\" (NIST FIPS 180-4 example)", async () => {
    const file = path.join(base, "abc");
    writeFileSync(file, "abc");
    const h = new FollowingHash(file);
    h.advance(3);
    expect(await h.digest(3)).toBe(ABC_SHA256);
  });

  it("follows a file that grows between advances and equals a one-pass hash of its bytes (derived)", async () => {
    const file = path.join(base, "growing");
    writeFileSync(file, "");
    const h = new FollowingHash(file);
    const reference = createHash("sha256");
    let size = 0;
    for (let i = 0; i < 40; i++) {
      const piece = Buffer.alloc(1 + i * 50_000, i);
      appendFileSync(file, piece);
      reference.update(piece);
      size += piece.length;
      h.advance(size);
    }
    expect(await h.digest(size)).toBe(reference.digest("hex"));
  });

  it("rejects when told of more bytes than the file holds (derived)", async () => {
    const file = path.join(base, "short");
    writeFileSync(file, "12345");
    await expect(new FollowingHash(file).digest(10)).rejects.toThrow(/shorter than what was written/);
  });
});
