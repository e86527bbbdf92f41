// The demo data creates accounts with published passwords (an admin among them), so it may only
// go into a database that is a demo already: never in production, never beside real people.
import type { Sequelize } from "sequelize";

/** Demo people's addresses (invented, .invalid per RFC 2606). */
export const DEMO_EMAIL_SUFFIX = "@demo.ratebook.invalid";

/** Why the demo data must not be added here, or null when it may. */
export async function seedRefusal(sequelize: Sequelize, env: NodeJS.ProcessEnv = process.env): Promise<string | null> {
  if (env.NODE_ENV === "production") {
    return "NODE_ENV is production: the demo data adds an admin whose password is printed in the README. Nothing was added.";
  }
  const [rows] = await sequelize.query(
    `select count(*)::int as n from information_schema.tables where table_schema = 'public' and table_name = 'users'`,
  );
  if ((rows as Array<{ n: number }>)[0].n === 0) return null;
  const [people] = await sequelize.query("select count(*)::int as n, min(email) as example from users where email not like $1", { bind: [`%${DEMO_EMAIL_SUFFIX}`] });
  const { n, example } = (people as Array<{ n: number; example: string | null }>)[0];
  if (n > 0) {
    return `this database holds ${n} ${n === 1 ? "person" : "people"} who ${n === 1 ? "is" : "are"} not demo people (e.g. ${example}): the demo data goes only into a demo database. Nothing was added.`;
  }
  return null;
}
