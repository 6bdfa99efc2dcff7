// Caught mail on disk: one JSON file per message in a directory shared by the catcher, the dev-mail route and tests.
import { mkdirSync, readdirSync, readFileSync, writeFileSync, renameSync } from "node:fs";
import path from "node:path";

export interface CaughtMail {
  id: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  receivedAt: string;
}

export function saveCaughtMail(dir: string, m: CaughtMail) {
  mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `${m.id}.json`);
  // Write then rename so a reader never sees half a message.
  writeFileSync(`${file}.tmp`, JSON.stringify(m));
  renameSync(`${file}.tmp`, file);
}

/** Newest first. */
export function readCaughtMail(dir: string): CaughtMail[] {
  let names: string[];
  try {
    names = readdirSync(dir).filter((n) => n.endsWith(".json"));
  } catch {
    return [];
  }
  return names
    .map((n) => JSON.parse(readFileSync(path.join(dir, n), "utf8")) as CaughtMail)
    .sort((a, b) => (a.receivedAt < b.receivedAt ? 1 : a.receivedAt > b.receivedAt ? -1 : b.id.localeCompare(a.id)));
}
