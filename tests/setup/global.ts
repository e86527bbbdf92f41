// Vitest global setup for the integration project: a fresh test database (dropped and made
// again on every run), migrated and seeded with the demo data, and a mail sink on test ports.
import { Sequelize } from "sequelize";
import pg from "pg";
import { ensurePostgres } from "../../scripts/lib/postgres";
import { startMailSink, type MailSink } from "../../scripts/lib/mail-sink";
import { createMigrator } from "../../db/migrator";
import { startFakeInstitution, type FakeInstitution } from "../../scripts/lib/fake-institution";
import { testEnv, TEST_MAIL_HTTP_PORT, TEST_OIDC_CLIENT, TEST_OIDC_PORT, TEST_SMTP_PORT } from "./test-env";

let sink: MailSink | null = null;
let institution: FakeInstitution | null = null;

export async function setup() {
  Object.assign(process.env, testEnv);
  if (!process.env.TEST_DATABASE_URL) {
    delete process.env.DATABASE_URL; // make ensurePostgres manage the local cluster
    const url = await ensurePostgres("ratebook_test", { reset: true });
    // The config named the port before the cluster started; if a clash moved it, the tests would
    // talk to another clone's cluster. Refuse rather than touch someone else's data.
    if (url !== testEnv.DATABASE_URL) {
      throw new Error(`The test cluster runs at ${url}, but the test configuration was built for ${testEnv.DATABASE_URL}. Run the tests again (npm test starts the cluster first).`);
    }
    process.env.DATABASE_URL = url;
  }
  const sequelize = new Sequelize(testEnv.DATABASE_URL, { dialect: "postgres", dialectModule: pg, logging: false });
  await createMigrator(sequelize, { quiet: true }).up();
  await sequelize.close();
  const { seedDemo } = await import("../../db/seeds/demo");
  await seedDemo();
  const { closeSequelize } = await import("../../app/.server/db/sequelize.server");
  await closeSequelize();
  sink = await startMailSink({ smtpPort: TEST_SMTP_PORT, httpPort: TEST_MAIL_HTTP_PORT });
  institution = await startFakeInstitution({ port: TEST_OIDC_PORT, clients: [TEST_OIDC_CLIENT] });
}

export async function teardown() {
  await sink?.close();
  await institution?.close();
}
