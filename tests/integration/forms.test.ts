import { eq, sql } from "drizzle-orm";
import { beforeEach, describe, expect, it } from "vitest";
import { db } from "@/db";
import { auditEvents, machines, users } from "@/db/schema";
import * as signInActions from "@/app/(auth)/sign-in/actions";
import * as machineActions from "@/app/(app)/admin/machines/actions";
import * as userActions from "@/app/(app)/admin/users/actions";
import * as accountActions from "@/app/(app)/account/actions";
import * as machinesRoute from "@/app/api/machines/route";
import { initialFormState } from "@/lib/form-state";
import { actAs, formData, jsonRequest, machineFields, makeUser } from "./helpers";

beforeEach(async () => {
  await actAs("admin");
});

describe("machine form", () => {
  it("reports every bad field at once, next to its field, and saves nothing", async () => {
    const before = await db().select({ n: sql<number>`count(*)::int` }).from(machines);
    const state = await machineActions.createMachineAction(
      initialFormState,
      formData(
        machineFields({
          name: "",
          units: "furlong",
          travelXMin: 10,
          travelXMax: 0,
          rapidRate: -1,
          maxSpindle: "fast",
          toolChangeSeconds: -3,
          workOffsetCount: 2.5,
          safeZ: "",
          dialect: "loose",
          arcTolerance: 0,
        }),
      ),
    );
    expect(state.status).toBe(422);
    expect(Object.keys(state.fieldErrors ?? {}).sort()).toEqual(
      ["arcTolerance", "dialect", "maxSpindle", "name", "rapidRate", "safeZ", "toolChangeSeconds", "travelXMax", "units", "workOffsetCount"].sort(),
    );
    expect(state.values?.notes).toBe("");
    const after = await db().select({ n: sql<number>`count(*)::int` }).from(machines);
    expect(after[0]!.n).toBe(before[0]!.n);
  });

  it("refuses a max feed above the rapid rate and a duplicate name (case-insensitive)", async () => {
    const fast = await machineActions.createMachineAction(initialFormState, formData(machineFields({ maxFeed: 9000, rapidRate: 5000 })));
    expect(fast.fieldErrors?.maxFeed?.[0]).toMatch(/rapid/);
    const m = machineFields();
    const res = await machinesRoute.POST(jsonRequest("POST", m), undefined);
    expect(res.status).toBe(201);
    const dup = await machineActions.createMachineAction(initialFormState, formData({ ...m, name: m.name.toUpperCase() }));
    expect(dup.status).toBe(409);
    expect(dup.fieldErrors?.name?.[0]).toMatch(/already exists/);
  });

  it("saves the dialect and the arc tolerance; a blank tolerance is the dialect's default", async () => {
    const m = machineFields();
    const res = await machinesRoute.POST(jsonRequest("POST", m), undefined);
    const { machine } = (await res.json()) as { machine: { id: number; dialect: string; arcTolerance: number | null } };
    expect(machine).toMatchObject({ dialect: "common", arcTolerance: null });
    const state = await machineActions.updateMachineAction(machine.id, initialFormState, formData({ ...m, dialect: "strict-ngc", arcTolerance: 0.01 }));
    expect(state.status).toBe(200);
    const row = async () =>
      (await db().select({ dialect: machines.dialect, arcTolerance: machines.arcTolerance }).from(machines).where(eq(machines.id, machine.id)))[0];
    expect(await row()).toEqual({ dialect: "strict-ngc", arcTolerance: 0.01 });
    const blank = await machineActions.updateMachineAction(machine.id, initialFormState, formData({ ...m, dialect: "strict-ngc", arcTolerance: "" }));
    expect(blank.status).toBe(200);
    expect(await row()).toEqual({ dialect: "strict-ngc", arcTolerance: null });
  });

  it("an edit records what changed in the audit record", async () => {
    const m = machineFields();
    const res = await machinesRoute.POST(jsonRequest("POST", m), undefined);
    const { machine } = (await res.json()) as { machine: { id: number } };
    const state = await machineActions.updateMachineAction(machine.id, initialFormState, formData({ ...m, safeZ: 12.5 }));
    expect(state.status).toBe(200);
    const [ev] = await db()
      .select({ details: auditEvents.details })
      .from(auditEvents)
      .where(sql`${auditEvents.action} = 'machine.update' and ${auditEvents.objectId} = ${String(machine.id)}`);
    expect(ev?.details).toMatchObject({ changed: { safeZ: { from: 5, to: 12.5 } } });
  });
});

describe("user forms", () => {
  it("create: every field's error, and the password is never echoed back", async () => {
    const state = await userActions.createUserAction(
      initialFormState,
      formData({ email: "not-an-email", displayName: "", role: "overlord", password: "short" }),
    );
    expect(state.status).toBe(422);
    expect(Object.keys(state.fieldErrors ?? {}).sort()).toEqual(["displayName", "email", "password", "role"]);
    expect(state.values).toBeDefined();
    expect(JSON.stringify(state)).not.toContain("short\"");
    expect(state.values?.password).toBeUndefined();
  });

  it("create: a duplicate e-mail (any case) is a 409 on the e-mail field", async () => {
    const u = await makeUser("operator");
    const state = await userActions.createUserAction(
      initialFormState,
      formData({ email: u.email.toUpperCase(), displayName: "Dup", role: "operator", password: "long-enough-password" }),
    );
    expect(state.status).toBe(409);
    expect(state.fieldErrors?.email?.[0]).toMatch(/already exists/);
  });

  it("edit: name and role are both checked", async () => {
    const u = await makeUser("operator");
    const state = await userActions.updateUserAction(u.id, initialFormState, formData({ displayName: " ", role: "" }));
    expect(state.status).toBe(422);
    expect(Object.keys(state.fieldErrors ?? {}).sort()).toEqual(["displayName", "role"]);
  });

  it("reset password: too short and mismatched repeat", async () => {
    const u = await makeUser("operator");
    const short = await userActions.resetPasswordAction(u.id, initialFormState, formData({ password: "abc", confirmPassword: "abc" }));
    expect(short.fieldErrors?.password?.[0]).toMatch(/12/);
    const differ = await userActions.resetPasswordAction(
      u.id,
      initialFormState,
      formData({ password: "long-enough-password", confirmPassword: "long-enough-passw0rd" }),
    );
    expect(differ.fieldErrors?.confirmPassword?.[0]).toMatch(/differ/);
  });

  it("disable: needs a yes or no, and an admin cannot disable themself", async () => {
    const me = await actAs("admin");
    const bad = await userActions.setUserDisabledAction(me!.id, initialFormState, formData({ disabled: "maybe" }));
    expect(bad.status).toBe(422);
    const self = await userActions.setUserDisabledAction(me!.id, initialFormState, formData({ disabled: "true" }));
    expect(self.status).toBe(409);
    const [row] = await db().select({ disabled: users.disabled }).from(users).where(eq(users.id, me!.id));
    expect(row?.disabled).toBe(false);
  });

  it("a failed user update leaves no audit event behind (one transaction)", async () => {
    const count = async () => (await db().select({ n: sql<number>`count(*)::int` }).from(auditEvents))[0]!.n;
    const before = await count();
    const state = await userActions.updateUserAction(2_000_000_000, initialFormState, formData({ displayName: "Ghost", role: "operator" }));
    expect(state.status).toBe(404);
    expect(await count()).toBe(before);
  });
});

describe("sign-in and account forms", () => {
  it("sign-in: blank fields get their own errors; the e-mail is kept, the password is not", async () => {
    const state = await signInActions.signInAction(initialFormState, formData({ email: "", password: "" }));
    expect(state.status).toBe(422);
    expect(Object.keys(state.fieldErrors ?? {}).sort()).toEqual(["email", "password"]);
    const wrong = await signInActions.signInAction(initialFormState, formData({ email: "someone@it.cyclegate.test", password: "nope" }));
    expect(wrong.status).toBe(401);
    expect(wrong.values).toEqual({ email: "someone@it.cyclegate.test" });
  });

  it("password change: wrong current password, short new one, mismatched repeat", async () => {
    const me = await actAs("operator");
    const wrongCurrent = await accountActions.changePasswordAction(
      initialFormState,
      formData({ currentPassword: "not-my-password", newPassword: "a-fine-new-password", confirmPassword: "a-fine-new-password" }),
    );
    expect(wrongCurrent.status).toBe(422);
    expect(wrongCurrent.fieldErrors?.currentPassword).toBeDefined();
    const bad = await accountActions.changePasswordAction(
      initialFormState,
      formData({ currentPassword: me!.password, newPassword: "short", confirmPassword: "other" }),
    );
    expect(Object.keys(bad.fieldErrors ?? {}).sort()).toEqual(["confirmPassword", "newPassword"]);
  });
});
