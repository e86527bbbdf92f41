// `npm run db:migrate` : applies pending migrations (`-- down` reverts the last one).
import { openAppDatabase } from "./lib/database";
import { createMigrator } from "../db/migrator";

const db = await openAppDatabase();
if (process.argv.includes("down")) await createMigrator(db.sequelize).down();
else {
  const done = await db.migrate();
  console.log(done.length ? `[db] applied ${done.map((m) => m.name).join(", ")}` : "[db] schema is up to date");
}
await db.close();
