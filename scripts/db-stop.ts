// `npm run db:stop` : stops the project-local PostgreSQL cluster.
import { stopLocalCluster } from "./lib/postgres";
stopLocalCluster();
console.log("[db] stopped");
