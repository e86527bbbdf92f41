// Shared by the start, migrate and seed commands: bring up the database, then load the app's
// models against it (models read DATABASE_URL when first imported).
import { ensurePostgres } from "./postgres";

export async function openAppDatabase(db = process.env.RATEBOOK_DB ?? "ratebook", opts: { reset?: boolean } = {}) {
  process.env.DATABASE_URL = await ensurePostgres(db, opts);
  const { getSequelize, closeSequelize } = await import("../../app/.server/db/sequelize.server");
  const { createMigrator } = await import("../../db/migrator");
  const sequelize = getSequelize();
  return {
    url: process.env.DATABASE_URL,
    sequelize,
    migrate: async (log = true) => createMigrator(sequelize, { quiet: !log }).up(),
    close: closeSequelize,
  };
}
