// `npm run db:stop` : stops the project-local PostgreSQL cluster and says where its data lives.
import { clusterLocation, stopLocalCluster } from "./lib/postgres";

if (process.env.DATABASE_URL) {
  console.log("[db] DATABASE_URL is set: Ratebook started no local cluster, so there is nothing to stop.");
} else if (stopLocalCluster()) {
  console.log(`[db] stopped. The data stays in ${clusterLocation.dataDir} (log: ${clusterLocation.logFile}).`);
  console.log(`[db] To remove it for good: rm -rf '${clusterLocation.home}'`);
} else {
  console.log(`[db] no local cluster for this clone (it would live in ${clusterLocation.home}).`);
}
