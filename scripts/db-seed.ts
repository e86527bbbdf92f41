// `npm run db:seed` : adds the invented demo scenario (idempotent). Refuses in production and on
// a database that holds people who are not demo people (db/seeds/guard.ts).
import { openAppDatabase } from "./lib/database";

const db = await openAppDatabase();
const { seedRefusal } = await import("../db/seeds/guard");
const refusal = await seedRefusal(db.sequelize);
if (refusal) {
  console.error(`[db] the demo data was refused: ${refusal}`);
  await db.close();
  process.exit(1);
}
await db.migrate(false);
const { seedDemo } = await import("../db/seeds/demo");
const signIns = await seedDemo();
console.log(`[db] demo data ready (${signIns.length} demo sign-ins)`);
await db.close();
