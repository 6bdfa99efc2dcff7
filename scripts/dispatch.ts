// Runs scripts/<folder>/<kind>.ts for the kind named first on the command line.
import { existsSync } from "node:fs";
import path from "node:path";

export async function dispatch(folder: string, kinds: string[], usage: string): Promise<never> {
  const [kind, ...rest] = process.argv.slice(2);
  if (!kind || !kinds.includes(kind)) {
    console.error(`usage: npm run ${folder} -- <${kinds.join("|")}> ${usage}`);
    process.exit(2);
  }
  const modulePath = path.join(import.meta.dirname, folder, `${kind}.ts`);
  if (!existsSync(modulePath)) {
    console.error(`${folder} ${kind}: not available yet`);
    process.exit(2);
  }
  const mod = (await import(modulePath)) as { main(argv: string[]): Promise<number> };
  process.exit(await mod.main(rest));
}
