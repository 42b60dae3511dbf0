import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import * as sessionRoute from "@/app/api/session/route";
import * as healthRoute from "@/app/api/health/route";
import * as machinesRoute from "@/app/api/machines/route";
import * as machineRoute from "@/app/api/machines/[id]/route";
import * as usersRoute from "@/app/api/users/route";
import * as userRoute from "@/app/api/users/[id]/route";
import * as auditRoute from "@/app/api/audit/route";
import * as signInActions from "@/app/(auth)/sign-in/actions";
import * as shellActions from "@/app/(app)/actions";
import * as machineActions from "@/app/(app)/admin/machines/actions";
import * as userActions from "@/app/(app)/admin/users/actions";
import * as accountActions from "@/app/(app)/account/actions";
import * as programActions from "@/app/(app)/programs/actions";
import * as revisionActions from "@/app/(app)/revisions/actions";
import * as machinePageActions from "@/app/(app)/machines/actions";
import * as partsRoute from "@/app/api/parts/route";
import * as programsRoute from "@/app/api/programs/route";
import * as programRoute from "@/app/api/programs/[id]/route";
import * as programEventsRoute from "@/app/api/programs/[id]/events/route";
import * as programRevisionsRoute from "@/app/api/programs/[id]/revisions/route";
import * as pushRoute from "@/app/api/revisions/route";
import * as revisionRoute from "@/app/api/revisions/[id]/route";
import * as revisionFileRoute from "@/app/api/revisions/[id]/file/route";
import * as revisionToolpathRoute from "@/app/api/revisions/[id]/toolpath/route";
import * as submitRoute from "@/app/api/revisions/[id]/submit/route";
import * as releaseRoute from "@/app/api/revisions/[id]/release/route";
import * as rejectRoute from "@/app/api/revisions/[id]/reject/route";
import * as compareRoute from "@/app/api/revisions/[id]/compare/[other]/route";
import * as tokensRoute from "@/app/api/tokens/route";
import * as tokenRoute from "@/app/api/tokens/[id]/route";
import * as outboxRoute from "@/app/api/outbox/route";
import * as workOffsetsRoute from "@/app/api/machines/[id]/work-offsets/route";
import * as runsRoute from "@/app/api/runs/route";
import * as signOffRoute from "@/app/api/revisions/[id]/runs/route";
import * as runActions from "@/app/(app)/runs/actions";
import { initialFormState } from "@/lib/form-state";
import { actAs, actionStatus, formData, jsonRequest, machineFields, makeUser, params, TEST_PASSWORD } from "./helpers";
import { insertProgram, insertRevision, ncProgram } from "./vault-helpers";

type Caller = Role | "anonymous";
const CALLERS: Caller[] = ["anonymous", "operator", "programmer", "lead", "admin"];

/** Expected status per caller, in CALLERS order. */
type Row = [number, number, number, number, number];
const SIGNED_IN: Row = [401, 200, 200, 200, 200];
const ADMIN_ONLY: Row = [401, 403, 403, 403, 200];
const LEAD_AND_ADMIN: Row = [401, 403, 403, 200, 200];
const PUBLIC: Row = [200, 200, 200, 200, 200];
const PROGRAMMER_ONLY: Row = [401, 403, 200, 403, 403];
const LEAD_ONLY: Row = [401, 403, 403, 200, 403];
/** Drafts: the uploader (a programmer; the fixture is the caller's own) or an admin. */
const UPLOADER_OR_ADMIN: Row = [401, 403, 200, 403, 200];
const AT_THE_MACHINE: Row = [401, 200, 403, 200, 200];
/** Sign-offs before cycle start: operators, and leads (who often run the first part). */
const SIGNS_OFF_RUNS: Row = [401, 200, 403, 200, 403];

interface Ctx {
  machineId: number;
  targetUserId: number;
  me: { id: number; email: string; password: string } | null;
  programId: number;
  revisionId: number;
  otherRevisionId: number;
  /** A released revision with a finished analysis that calls no offset or tool (only identity and dry run to tick). */
  released: { id: number; sha256: string };
}

/** A fresh revision of the shared program in `status`, uploaded by the caller (or by the fixture owner). */
const freshRevision = (c: Ctx, status: "draft" | "submitted", byCaller = true) =>
  insertRevision({ programId: c.programId, uploadedBy: byCaller && c.me ? c.me.id : c.targetUserId, status });
const rev = (id: number) => params({ id: String(id) });
const textUpload = (url: string) => new Request(url, { method: "POST", headers: { "content-type": "text/plain" }, body: ncProgram() });

interface Case {
  /** "GET /api/x" for route handlers, "action file#name" for server actions. */
  name: string;
  expect: Row;
  run: (ctx: Ctx) => Promise<number>;
}

const http = (res: Promise<Response>) => res.then((r) => (r.status >= 200 && r.status < 300 ? 200 : r.status));

/** Every route handler and server action of the app, against every caller. */
const CASES: Case[] = [
  { name: "GET /api/health", expect: PUBLIC, run: () => http(healthRoute.GET()) },
  { name: "GET /api/session", expect: SIGNED_IN, run: () => http(sessionRoute.GET(jsonRequest("GET"), undefined)) },
  {
    name: "POST /api/session",
    expect: PUBLIC, // sign-in itself: everyone may try; a fresh account's right password answers 200
    run: async () => {
      const u = await makeUser("operator");
      return http(sessionRoute.POST(jsonRequest("POST", { email: u.email, password: u.password }), undefined));
    },
  },
  { name: "DELETE /api/session", expect: SIGNED_IN, run: () => http(sessionRoute.DELETE(jsonRequest("DELETE"), undefined)) },
  { name: "GET /api/machines", expect: SIGNED_IN, run: () => http(machinesRoute.GET(jsonRequest("GET"), undefined)) },
  {
    name: "POST /api/machines",
    expect: ADMIN_ONLY,
    run: () => http(machinesRoute.POST(jsonRequest("POST", machineFields()), undefined)),
  },
  {
    name: "GET /api/machines/[id]",
    expect: SIGNED_IN,
    run: (c) => http(machineRoute.GET(jsonRequest("GET"), params({ id: String(c.machineId) }))),
  },
  {
    name: "PUT /api/machines/[id]",
    expect: ADMIN_ONLY,
    run: (c) => http(machineRoute.PUT(jsonRequest("PUT", machineFields()), params({ id: String(c.machineId) }))),
  },
  { name: "GET /api/users", expect: ADMIN_ONLY, run: () => http(usersRoute.GET(jsonRequest("GET"), undefined)) },
  {
    name: "POST /api/users",
    expect: ADMIN_ONLY,
    run: () =>
      http(
        usersRoute.POST(
          jsonRequest("POST", { email: `new-${Math.random().toString(36).slice(2)}@it.cyclegate.test`, displayName: "New", role: "operator", password: "a-long-enough-password" }),
          undefined,
        ),
      ),
  },
  {
    name: "GET /api/users/[id]",
    expect: ADMIN_ONLY,
    run: (c) => http(userRoute.GET(jsonRequest("GET"), params({ id: String(c.targetUserId) }))),
  },
  {
    name: "PATCH /api/users/[id]",
    expect: ADMIN_ONLY,
    run: (c) => http(userRoute.PATCH(jsonRequest("PATCH", { displayName: "Renamed target" }), params({ id: String(c.targetUserId) }))),
  },
  { name: "GET /api/parts", expect: SIGNED_IN, run: () => http(partsRoute.GET(jsonRequest("GET", undefined, "http://localhost/api/parts?q=a"), undefined)) },
  {
    name: "POST /api/parts",
    expect: PROGRAMMER_ONLY,
    run: () => http(partsRoute.POST(jsonRequest("POST", { number: `RM-${Math.random().toString(36).slice(2, 10)}`, name: "Matrix part" }), undefined)),
  },
  { name: "GET /api/programs", expect: SIGNED_IN, run: () => http(programsRoute.GET(jsonRequest("GET", undefined, "http://localhost/api/programs?status=draft&sort=title"), undefined)) },
  {
    name: "POST /api/programs",
    expect: PROGRAMMER_ONLY,
    run: async (c) => {
      const partRes = await partsRoute.POST(jsonRequest("POST", { number: `RP-${Math.random().toString(36).slice(2, 10)}`, name: "p" }), undefined);
      const partId = partRes.status === 201 ? ((await partRes.json()) as { part: { id: number } }).part.id : 1;
      return http(
        programsRoute.POST(
          jsonRequest("POST", { programNumber: `O${Math.floor(Math.random() * 1e6)}`, title: "Matrix program", partId, machineId: c.machineId }),
          undefined,
        ),
      );
    },
  },
  { name: "GET /api/programs/[id]", expect: SIGNED_IN, run: (c) => http(programRoute.GET(jsonRequest("GET"), rev(c.programId))) },
  { name: "PATCH /api/programs/[id]", expect: PROGRAMMER_ONLY, run: (c) => http(programRoute.PATCH(jsonRequest("PATCH", { title: "Renamed" }), rev(c.programId))) },
  { name: "GET /api/programs/[id]/events", expect: SIGNED_IN, run: (c) => http(programEventsRoute.GET(jsonRequest("GET"), rev(c.programId))) },
  {
    name: "POST /api/programs/[id]/revisions",
    expect: PROGRAMMER_ONLY,
    run: (c) => http(programRevisionsRoute.POST(textUpload(`http://localhost/api/programs/${c.programId}/revisions`), rev(c.programId))),
  },
  {
    name: "POST /api/revisions",
    expect: PROGRAMMER_ONLY,
    run: (c) => http(pushRoute.POST(textUpload(`http://localhost/api/revisions?program=O4242&machine=${c.machineId}&part=RM-PUSH`), undefined)),
  },
  { name: "GET /api/revisions/[id]", expect: SIGNED_IN, run: (c) => http(revisionRoute.GET(jsonRequest("GET"), rev(c.revisionId))) },
  { name: "DELETE /api/revisions/[id]", expect: UPLOADER_OR_ADMIN, run: async (c) => http(revisionRoute.DELETE(jsonRequest("DELETE"), rev(await freshRevision(c, "draft")))) },
  { name: "GET /api/revisions/[id]/file", expect: SIGNED_IN, run: (c) => http(revisionFileRoute.GET(jsonRequest("GET"), rev(c.revisionId))) },
  { name: "GET /api/revisions/[id]/toolpath", expect: SIGNED_IN, run: (c) => http(revisionToolpathRoute.GET(jsonRequest("GET"), rev(c.revisionId))) },
  { name: "POST /api/revisions/[id]/submit", expect: PROGRAMMER_ONLY, run: async (c) => http(submitRoute.POST(jsonRequest("POST", { comment: "" }), rev(await freshRevision(c, "draft")))) },
  {
    name: "POST /api/revisions/[id]/release",
    expect: LEAD_ONLY,
    run: async (c) =>
      http(releaseRoute.POST(jsonRequest("POST", { password: c.me?.password ?? TEST_PASSWORD, comment: "matrix" }), rev(await freshRevision(c, "submitted", false)))),
  },
  { name: "POST /api/revisions/[id]/reject", expect: LEAD_ONLY, run: async (c) => http(rejectRoute.POST(jsonRequest("POST", { comment: "matrix" }), rev(await freshRevision(c, "submitted", false)))) },
  {
    name: "GET /api/revisions/[id]/compare/[other]",
    expect: SIGNED_IN,
    run: (c) => http(compareRoute.GET(jsonRequest("GET"), params({ id: String(c.revisionId), other: String(c.otherRevisionId) }))),
  },
  { name: "GET /api/tokens", expect: PROGRAMMER_ONLY, run: () => http(tokensRoute.GET(jsonRequest("GET"), undefined)) },
  { name: "POST /api/tokens", expect: PROGRAMMER_ONLY, run: () => http(tokensRoute.POST(jsonRequest("POST", { name: "matrix" }), undefined)) },
  {
    name: "DELETE /api/tokens/[id]",
    expect: PROGRAMMER_ONLY,
    run: async () => {
      const created = await tokensRoute.POST(jsonRequest("POST", { name: "to revoke" }), undefined);
      const id = created.status === 201 ? ((await created.json()) as { token: { id: number } }).token.id : 1;
      return http(tokenRoute.DELETE(jsonRequest("DELETE"), rev(id)));
    },
  },
  { name: "GET /api/outbox", expect: ADMIN_ONLY, run: () => http(outboxRoute.GET(jsonRequest("GET", undefined, "http://localhost/api/outbox?state=sent"), undefined)) },
  { name: "GET /api/machines/[id]/work-offsets", expect: SIGNED_IN, run: (c) => http(workOffsetsRoute.GET(jsonRequest("GET"), rev(c.machineId))) },
  {
    name: "PUT /api/machines/[id]/work-offsets",
    expect: AT_THE_MACHINE,
    run: (c) => http(workOffsetsRoute.PUT(jsonRequest("PUT", { code: "G55", x: -100.5, y: -50, z: -200 }), rev(c.machineId))),
  },
  {
    name: "DELETE /api/machines/[id]/work-offsets",
    expect: AT_THE_MACHINE,
    run: async (c) => {
      const { setFixtureOffset } = await import("./vault-helpers");
      await setFixtureOffset(c.machineId, "G59");
      return http(workOffsetsRoute.DELETE(jsonRequest("DELETE", undefined, "http://localhost/api?code=G59"), rev(c.machineId)));
    },
  },
  { name: "GET /api/runs", expect: SIGNED_IN, run: () => http(runsRoute.GET(jsonRequest("GET", undefined, "http://localhost/api/runs?page=1&from=2020-01-01"), undefined)) },
  {
    name: "POST /api/revisions/[id]/runs",
    expect: SIGNS_OFF_RUNS,
    run: (c) =>
      http(
        signOffRoute.POST(
          jsonRequest("POST", { password: c.me?.password ?? TEST_PASSWORD, sha256: c.released.sha256, identity: true, dryRun: true, quantity: 2 }),
          rev(c.released.id),
        ),
      ),
  },
  { name: "GET /api/audit", expect: LEAD_AND_ADMIN, run: () => http(auditRoute.GET(jsonRequest("GET", undefined, "http://localhost/api/audit?page=1"), undefined)) },

  {
    name: "action sign-in#signInAction",
    expect: PUBLIC,
    run: async () => {
      const u = await makeUser("operator");
      return actionStatus(() => signInActions.signInAction(initialFormState, formData({ email: u.email, password: u.password })));
    },
  },
  { name: "action shell#signOutAction", expect: PUBLIC, run: () => actionStatus(() => shellActions.signOutAction()) },
  {
    name: "action machines#createMachineAction",
    expect: ADMIN_ONLY,
    run: () => actionStatus(() => machineActions.createMachineAction(initialFormState, formData(machineFields()))),
  },
  {
    name: "action machines#updateMachineAction",
    expect: ADMIN_ONLY,
    run: (c) => actionStatus(() => machineActions.updateMachineAction(c.machineId, initialFormState, formData(machineFields()))),
  },
  {
    name: "action users#createUserAction",
    expect: ADMIN_ONLY,
    run: () =>
      actionStatus(() =>
        userActions.createUserAction(
          initialFormState,
          formData({ email: `f-${Math.random().toString(36).slice(2)}@it.cyclegate.test`, displayName: "Form user", role: "programmer", password: "a-long-enough-password" }),
        ),
      ),
  },
  {
    name: "action users#updateUserAction",
    expect: ADMIN_ONLY,
    run: (c) => actionStatus(() => userActions.updateUserAction(c.targetUserId, initialFormState, formData({ displayName: "Target", role: "operator" }))),
  },
  {
    name: "action users#setUserDisabledAction",
    expect: ADMIN_ONLY,
    run: (c) => actionStatus(() => userActions.setUserDisabledAction(c.targetUserId, initialFormState, formData({ disabled: "false" }))),
  },
  {
    name: "action users#resetPasswordAction",
    expect: ADMIN_ONLY,
    run: (c) =>
      actionStatus(() =>
        userActions.resetPasswordAction(c.targetUserId, initialFormState, formData({ password: "another-long-pass", confirmPassword: "another-long-pass" })),
      ),
  },
  {
    name: "action account#changePasswordAction",
    expect: SIGNED_IN,
    run: (c) =>
      actionStatus(() =>
        accountActions.changePasswordAction(
          initialFormState,
          formData({ currentPassword: c.me?.password ?? TEST_PASSWORD, newPassword: "a-brand-new-password", confirmPassword: "a-brand-new-password" }),
        ),
      ),
  },

  // The vault pages' server actions.
  {
    name: "action programs#createPartAction",
    expect: PROGRAMMER_ONLY,
    run: () => actionStatus(() => programActions.createPartAction(initialFormState, formData({ number: `PG-${Math.random().toString(36).slice(2, 10)}`, name: "Page part" }))),
  },
  {
    name: "action programs#createProgramAction",
    expect: PROGRAMMER_ONLY,
    run: async (c) => {
      const partId = await insertPartRow();
      return actionStatus(() =>
        programActions.createProgramAction(
          initialFormState,
          formData({ programNumber: `O${Math.floor(Math.random() * 1e6)}`, title: "Page program", partId, machineId: c.machineId, partsPerCycle: 1 }),
        ),
      );
    },
  },
  {
    name: "action programs#updateProgramAction",
    expect: PROGRAMMER_ONLY,
    run: (c) =>
      actionStatus(() => programActions.updateProgramAction(c.programId, initialFormState, formData({ title: "Renamed on the page", operation: "", machineId: c.machineId, partsPerCycle: 1, safeZ: "" }))),
  },
  {
    name: "action revisions#submitRevisionAction",
    expect: PROGRAMMER_ONLY,
    run: async (c) => actionStatus(async () => revisionActions.submitRevisionAction(await freshRevision(c, "draft"), initialFormState, formData({ comment: "ready" }))),
  },
  {
    name: "action revisions#releaseRevisionAction",
    expect: LEAD_ONLY,
    run: async (c) =>
      actionStatus(async () =>
        revisionActions.releaseRevisionAction(await freshRevision(c, "submitted", false), initialFormState, formData({ password: c.me?.password ?? TEST_PASSWORD, comment: "matrix" })),
      ),
  },
  {
    name: "action revisions#rejectRevisionAction",
    expect: LEAD_ONLY,
    run: async (c) => actionStatus(async () => revisionActions.rejectRevisionAction(await freshRevision(c, "submitted", false), initialFormState, formData({ rejectComment: "matrix" }))),
  },
  {
    name: "action revisions#deleteDraftAction",
    expect: UPLOADER_OR_ADMIN,
    run: async (c) => actionStatus(async () => revisionActions.deleteDraftAction(await freshRevision(c, "draft"), initialFormState, formData({ confirm: true }))),
  },
  {
    name: "action machines#setWorkOffsetAction",
    expect: AT_THE_MACHINE,
    run: (c) => actionStatus(() => machinePageActions.setWorkOffsetAction(c.machineId, initialFormState, formData({ code: "G56", x: "-120.5", y: "-60", z: "-210" }))),
  },
  {
    name: "action machines#clearWorkOffsetAction",
    expect: AT_THE_MACHINE,
    run: async (c) => {
      const { setFixtureOffset } = await import("./vault-helpers");
      await setFixtureOffset(c.machineId, "G58");
      return actionStatus(() => machinePageActions.clearWorkOffsetAction(c.machineId, initialFormState, formData({ code: "G58" })));
    },
  },
  {
    name: "action runs#signOffRunAction",
    expect: SIGNS_OFF_RUNS,
    run: (c) =>
      actionStatus(() =>
        runActions.signOffRunAction(
          c.released.id,
          initialFormState,
          formData({ password: c.me?.password ?? TEST_PASSWORD, sha256: c.released.sha256, identity: true, dryRun: true }),
        ),
      ),
  },
  {
    name: "action account#createTokenAction",
    expect: PROGRAMMER_ONLY,
    run: () => actionStatus(() => accountActions.createTokenAction(initialFormState, formData({ name: "matrix page token" }))),
  },
  {
    name: "action account#revokeTokenAction",
    expect: PROGRAMMER_ONLY,
    run: async () => {
      const created = await tokensRoute.POST(jsonRequest("POST", { name: "page revoke" }), undefined);
      const id = created.status === 201 ? ((await created.json()) as { token: { id: number } }).token.id : 1;
      return actionStatus(() => accountActions.revokeTokenAction(id, initialFormState, formData({})));
    },
  },
];

/** A part row straight into the database (the create-program form needs one to pick). */
async function insertPartRow(): Promise<number> {
  const { parts } = await import("@/db/schema");
  const { db } = await import("@/db");
  const [row] = await db().insert(parts).values({ number: `PP-${Math.random().toString(36).slice(2, 10)}`, name: "Picked part" }).returning({ id: parts.id });
  return row!.id;
}

let machineId = 0;
let targetUserId = 0;
let programId = 0;
let revisionId = 0;
let otherRevisionId = 0;
let released = { id: 0, sha256: "" };

beforeAll(async () => {
  await actAs("admin");
  const res = await machinesRoute.POST(jsonRequest("POST", machineFields()), undefined);
  machineId = ((await res.json()) as { machine: { id: number } }).machine.id;
  targetUserId = (await makeUser("operator")).id;
  const owner = await makeUser("programmer");
  programId = await insertProgram(owner.id, machineId);
  revisionId = await insertRevision({ programId, uploadedBy: owner.id });
  otherRevisionId = await insertRevision({ programId, uploadedBy: owner.id, text: ncProgram("other", "G1 X30") });
  const releasedProgram = await insertProgram(owner.id, machineId);
  const releasedId = await insertRevision({ programId: releasedProgram, uploadedBy: owner.id, status: "released" });
  const { revisions: revisionsTable } = await import("@/db/schema");
  const { db } = await import("@/db");
  const { eq } = await import("drizzle-orm");
  const [row] = await db().select({ sha256: revisionsTable.sha256 }).from(revisionsTable).where(eq(revisionsTable.id, releasedId));
  released = { id: releasedId, sha256: row!.sha256 };
});

describe("role matrix: every route handler and server action x every caller", () => {
  for (const c of CASES) {
    CALLERS.forEach((caller, i) => {
      it(`${c.name} as ${caller} -> ${c.expect[i]}`, async () => {
        const me = await actAs(caller);
        const status = await c.run({ machineId, targetUserId, me, programId, revisionId, otherRevisionId, released });
        expect(status).toBe(c.expect[i]);
      });
    });
  }
});

/** Walks app/ for route handlers' HTTP methods and actions' exported functions. */
function discover(): string[] {
  const root = path.resolve(import.meta.dirname, "../../app");
  const found: string[] = [];
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir)) {
      const full = path.join(dir, entry);
      if (statSync(full).isDirectory()) walk(full);
      else if (entry === "route.ts") {
        const src = readFileSync(full, "utf8");
        const url = "/" + path.relative(root, path.dirname(full)).split(path.sep).join("/");
        for (const m of src.matchAll(/export (?:const|async function) (GET|POST|PUT|PATCH|DELETE)\b/g)) found.push(`${m[1]} ${url}`);
      } else if (entry === "actions.ts") {
        const src = readFileSync(full, "utf8");
        for (const m of src.matchAll(/export async function (\w+)/g)) found.push(`${path.relative(root, full)}#${m[1]}`);
      }
    }
  };
  walk(root);
  return found;
}

describe("role matrix coverage", () => {
  it("has a row for every route handler and server action in app/", () => {
    const names = CASES.map((c) => c.name);
    const actionName = (n: string) => n.split("#")[1];
    const missing = discover().filter((d) =>
      d.includes("#") ? !names.some((n) => n.startsWith("action ") && actionName(n) === actionName(d)) : !names.includes(d),
    );
    expect(missing).toEqual([]);
  });
});
