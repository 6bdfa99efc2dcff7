// npm run analyze -- <kind> <input> [options] — runs one pipeline on a local file and writes
// its summary JSON and artifacts into --out; each kind lives in scripts/analyze/<kind>.ts.
import { dispatch } from "./dispatch";

await dispatch("analyze", ["drainage", "surface", "line", "network"], "<input> [--out dir] [options]");
