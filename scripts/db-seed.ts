// `npm run db:seed` : adds the invented demo scenario (idempotent).
import { openAppDatabase } from "./lib/database";

const db = await openAppDatabase();
await db.migrate(false);
const { seedDemo } = await import("../db/seeds/demo");
const signIns = await seedDemo();
console.log(`[db] demo data ready (${signIns.length} demo sign-ins)`);
await db.close();
