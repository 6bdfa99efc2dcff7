// Local database commands: `npm run db -- start|stop|status`.
import { clusterPort, ensureCluster, stopCluster } from "@/db/cluster";

const command = process.argv[2];
if (command === "start") {
  const info = await ensureCluster();
  console.log(`PostgreSQL ${info.startedNow ? "started" : "already running"} on 127.0.0.1:${info.port}`);
} else if (command === "stop") {
  stopCluster();
  console.log("PostgreSQL stopped");
} else if (command === "status") {
  const info = await ensureCluster();
  console.log(`PostgreSQL on 127.0.0.1:${clusterPort()}${info.startedNow ? " (was stopped; started it)" : ""}`);
} else {
  console.error("usage: npm run db -- start|stop|status");
  process.exit(2);
}
