import { hash } from "@node-rs/argon2";
import { sql } from "drizzle-orm";
import { createDb } from "../db/client";
import { DEMO_MACHINES, DEMO_SHOP, DEMO_USERS } from "../db/demo-data";
import { appState, auditEvents, machines, users } from "../db/schema";
import { ARGON2_OPTIONS } from "../lib/auth/argon2-options";
import { loadEnv } from "../lib/env";
import { seedVault } from "./seed-vault";

const SEED_KEY = "demo-seeded";

/**
 * Seeds the demo shop once. A marker row records that it ran, so a later start never re-creates
 * or overwrites anything users changed, renamed or disabled.
 */
async function main() {
  const env = loadEnv(process.env, { needSecret: false });
  const db = createDb(env.databaseUrl, 1);
  try {
    const passwordHash = await hash(env.demoPassword, ARGON2_OPTIONS);
    const seeded = await db.transaction(async (tx) => {
      // Serialises two starts racing on one database.
      await tx.execute(sql`select pg_advisory_xact_lock(727001)`);
      const marker = await tx.select().from(appState).where(sql`${appState.key} = ${SEED_KEY}`);
      if (marker.length > 0) return false;
      await tx
        .insert(users)
        .values(DEMO_USERS.map((u) => ({ ...u, passwordHash })))
        .onConflictDoNothing();
      await tx.insert(machines).values(DEMO_MACHINES).onConflictDoNothing();
      await tx.insert(appState).values({ key: SEED_KEY, value: { shop: DEMO_SHOP, at: new Date().toISOString() } });
      await tx.insert(auditEvents).values({
        action: "demo.seed",
        objectType: "app",
        details: { shop: DEMO_SHOP, users: DEMO_USERS.length, machines: DEMO_MACHINES.length },
      });
      return true;
    });
    console.log(seeded ? `demo data seeded (${DEMO_SHOP})` : "demo data already present; left as it is");
    // Its own markers: a database seeded before the program vault existed gets the demo programs once too.
    console.log(await seedVault(db));
  } finally {
    await db.$client.end();
  }
}

main().catch((err) => {
  console.error(`seed failed: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
