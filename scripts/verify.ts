// npm run verify -- doc.json sig.jws [--jwks jwks.json | --url http://host:port] [--files a.tif b.geojson …]
// Checks a provenance document against its detached JWS with the published keys, then re-hashes any files
// given against the inputs and artifacts the document names. Exit 0 only when everything checks.
import { readFile } from "node:fs/promises";
import type { JSONWebKeySet } from "jose";
import { verifyDetached } from "@/lib/provenance/detached-jws";
import type { ProvDocument } from "@/lib/provenance/prov-json";
import { checkFiles } from "@/lib/provenance/verify-files";

const USAGE = "usage: npm run verify -- doc.json sig.jws [--jwks jwks.json | --url http://127.0.0.1:3000] [--files file …]";

function parseArgs(argv: string[]) {
  const positional: string[] = [], files: string[] = [];
  let jwks: string | undefined, url: string | undefined, inFiles = false;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "--jwks") jwks = argv[++i];
    else if (a === "--url") url = argv[++i];
    else if (a === "--files") inFiles = true;
    else if (a.startsWith("--")) throw new Error(`unknown option ${a}\n${USAGE}`);
    else (inFiles ? files : positional).push(a);
  }
  if (positional.length !== 2) throw new Error(USAGE);
  return { doc: positional[0], jws: positional[1], jwks, url: url ?? process.env.RILLSCALE_URL ?? "http://127.0.0.1:3000", files };
}

async function main(): Promise<number> {
  const a = parseArgs(process.argv.slice(2));
  const bytes = new Uint8Array(await readFile(a.doc));
  const jws = (await readFile(a.jws, "utf8")).trim();
  let keys: JSONWebKeySet;
  if (a.jwks) keys = JSON.parse(await readFile(a.jwks, "utf8")) as JSONWebKeySet;
  else {
    const res = await fetch(new URL("/.well-known/jwks.json", a.url));
    if (!res.ok) throw new Error(`GET ${res.url} answered ${res.status}`);
    keys = (await res.json()) as JSONWebKeySet;
  }
  let ok = true;
  try {
    const v = await verifyDetached(bytes, jws, keys);
    console.log(`signature: valid (${v.alg}, kid ${v.kid})`);
  } catch (e) {
    console.log(`signature: INVALID — ${(e as Error).message}`);
    ok = false;
  }
  if (a.files.length > 0) {
    const doc = JSON.parse(Buffer.from(bytes).toString("utf8")) as ProvDocument;
    for (const c of await checkFiles(doc, a.files)) {
      console.log(`${c.ok ? "file ok" : "file MISMATCH"}: ${c.detail}`);
      ok &&= c.ok;
    }
  }
  console.log(ok ? "verified" : "NOT verified");
  return ok ? 0 : 1;
}

main().then((code) => process.exit(code), (e) => {
  console.error((e as Error).message);
  process.exit(2);
});
