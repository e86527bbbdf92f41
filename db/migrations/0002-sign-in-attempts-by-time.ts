// Old sign-in attempts are pruned on every attempt; this index keeps that delete cheap.
import type { QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addIndex("sign_in_attempts", ["created_at"], { name: "sign_in_attempts_created_at" });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeIndex("sign_in_attempts", "sign_in_attempts_created_at");
}
