// The software that produces results: its version goes into every result-cache key, so an upgrade never serves
// a result an older build computed.
import { readFileSync } from "node:fs";
import path from "node:path";

const pkg = JSON.parse(readFileSync(path.join(process.cwd(), "package.json"), "utf8")) as { name: string; version: string };

export const SOFTWARE = { name: pkg.name, version: pkg.version } as const;
