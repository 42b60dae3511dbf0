import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { db } from "@/db";
import { users, type Role } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import { signIn } from "@/lib/auth/sign-in";
import { requestContext } from "./request-context";

export const TEST_PASSWORD = "integration-pass-1";

let hashed: Promise<string> | undefined;

/** A fresh user of `role` with a unique e-mail, straight into the database. */
export async function makeUser(role: Role, opts: { password?: string } = {}) {
  const passwordHash = opts.password ? await hashPassword(opts.password) : await (hashed ??= hashPassword(TEST_PASSWORD));
  const email = `${role}-${randomUUID().slice(0, 8)}@it.cyclegate.test`;
  const [row] = await db()
    .insert(users)
    .values({ email, displayName: `Test ${role}`, role, passwordHash })
    .returning({ id: users.id, email: users.email });
  if (!row) throw new Error("no user");
  return { ...row, role, password: opts.password ?? TEST_PASSWORD };
}

/** A fresh browser signed in as a fresh user of `role`; anonymous leaves the jar empty. */
export async function actAs(role: Role | "anonymous") {
  requestContext.reset(`10.99.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`);
  if (role === "anonymous") return null;
  const user = await makeUser(role);
  const result = await signIn(user.email, user.password);
  if (!result.ok) throw new Error(`could not sign in as ${role}: ${result.message}`);
  return user;
}

export async function userRow(id: number) {
  const [row] = await db().select().from(users).where(eq(users.id, id));
  return row;
}

/** The status a server action ended with: a redirect counts as success (200). */
export async function actionStatus(run: () => Promise<{ status: number } | void>): Promise<number> {
  try {
    const state = await run();
    if (!state) return 200;
    return state.status >= 200 && state.status < 300 ? 200 : state.status;
  } catch (e) {
    const digest = (e as { digest?: unknown })?.digest;
    if (typeof digest === "string" && digest.startsWith("NEXT_REDIRECT")) return 200;
    throw e;
  }
}

export function formData(fields: Record<string, string | boolean | number>): FormData {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) {
    if (v === false) continue;
    fd.set(k, v === true ? "on" : String(v));
  }
  return fd;
}

export function jsonRequest(method: string, body?: unknown, url = "http://localhost/api"): Request {
  return new Request(url, {
    method,
    headers: body === undefined ? {} : { "content-type": "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
}

export const params = <T extends Record<string, string>>(p: T) => ({ params: Promise.resolve(p) });

/** A valid machine, unique by name. */
export function machineFields(overrides: Record<string, string | number | boolean> = {}) {
  return {
    name: `Test mill ${randomUUID().slice(0, 8)}`,
    notes: "",
    units: "mm",
    travelXMin: -300,
    travelXMax: 0,
    travelYMin: -150,
    travelYMax: 0,
    travelZMin: -250,
    travelZMax: 0,
    rapidRate: 5000,
    maxFeed: 2000,
    maxSpindle: 6000,
    acceleration: 400,
    toolChangeSeconds: 30,
    manualToolChange: true,
    spindleProgramControlled: false,
    hMustEqualT: true,
    safeZ: 5,
    workOffsetCount: 6,
    dialect: "common",
    ...overrides,
  };
}

/** The database's message when `q` fails (a trigger's refusal, a constraint), or null when it succeeds. */
export async function dbError(q: Promise<unknown>): Promise<string | null> {
  try {
    await q;
  } catch (e) {
    return (e as { cause?: { message?: string } }).cause?.message ?? (e as Error).message;
  }
  return null;
}
