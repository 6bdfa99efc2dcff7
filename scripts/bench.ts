// npm run bench -- <kind> [options] — measures one part against the native references in
// ../shared/reference, as ratios measured in the same run; each kind lives in scripts/bench/<kind>.ts.
import { dispatch } from "./dispatch";

await dispatch("bench", ["drainage", "surface", "api"], "[options]");
