/**
 * Input an attacker sends on purpose (issue items 1, 7 and 8): every odd value gets a 4xx with a
 * message, never a 500, and never changes anything it should not.
 */
import { eq } from "drizzle-orm";
import { beforeEach, describe, expect, it } from "vitest";
import { db } from "@/db";
import { machines, users } from "@/db/schema";
import * as signInActions from "@/app/(auth)/sign-in/actions";
import * as machineActions from "@/app/(app)/admin/machines/actions";
import * as userActions from "@/app/(app)/admin/users/actions";
import * as machinesRoute from "@/app/api/machines/route";
import * as userRoute from "@/app/api/users/[id]/route";
import * as auditRoute from "@/app/api/audit/route";
import * as sessionRoute from "@/app/api/session/route";
import { initialFormState, type FormState } from "@/lib/form-state";
import { actAs, actionStatus, formData, jsonRequest, machineFields, makeUser, params } from "./helpers";
import { requestContext } from "./request-context";

const is4xx = (status: number) => status >= 400 && status < 500;

beforeEach(async () => {
  await actAs("admin");
});

describe("redirect after sign-in stays inside the app (item 1, the action)", () => {
  /** Where the sign-in action sends the browser: the URL inside Next's redirect signal. */
  async function landing(next: string): Promise<string> {
    const u = await makeUser("operator");
    requestContext.reset();
    try {
      const state = await signInActions.signInAction(initialFormState, formData({ email: u.email, password: u.password, next }));
      throw new Error(`no redirect: ${JSON.stringify(state)}`);
    } catch (e) {
      const digest = String((e as { digest?: unknown }).digest ?? "");
      const m = /^NEXT_REDIRECT;[^;]*;([\s\S]*);\d{3};$/.exec(digest);
      if (!m) throw e;
      return m[1]!;
    }
  }

  it.each([
    ["/\t/evil.example"],
    ["/\t\\evil.example"],
    ["/.//evil.example"],
    ["/..//evil.example"],
    ["//evil.example"],
    ["/\\evil.example"],
    ["https://evil.example/"],
    ["/audit\nSet-Cookie: x=1"],
    ["/audit\r\n"],
    ["/%0d%0aSet-Cookie:x"],
    ["javascript:alert(1)"],
    [""],
  ])("refuses %j and lands on /", async (next) => {
    expect(await landing(next)).toBe("/");
  });

  it.each([
    ["/audit?page=2", "/audit?page=2"],
    ["/admin/users/3", "/admin/users/3"],
    ["/machines#bay-b", "/machines#bay-b"],
  ])("keeps the way back %j", async (next, expected) => {
    expect(await landing(next)).toBe(expected);
  });
});

describe("bound ids of server actions (item 7)", () => {
  it("an admin cannot disable or demote themself by passing their own id as a string", async () => {
    const me = await actAs("admin");
    const asString = String(me!.id) as unknown as number;
    const disable = await userActions.setUserDisabledAction(asString, initialFormState, formData({ disabled: "true" }));
    const demote = await userActions.updateUserAction(asString, initialFormState, formData({ displayName: "Me", role: "operator" }));
    expect(is4xx(disable.status)).toBe(true);
    expect(is4xx(demote.status)).toBe(true);
    const [row] = await db().select({ role: users.role, disabled: users.disabled }).from(users).where(eq(users.id, me!.id));
    expect(row).toEqual({ role: "admin", disabled: false });
  });

  const ODD_IDS: unknown[] = ["abc", "7", "-1", -1, 0, 1.5, "1e3", " 7", {}, [], [7], null, true, "99999999999", 2 ** 31, Number.NaN];

  it("every action that takes an id answers 4xx for anything but a positive integer", async () => {
    const target = await makeUser("operator");
    const res = await machinesRoute.POST(jsonRequest("POST", machineFields()), undefined);
    const machineId = ((await res.json()) as { machine: { id: number } }).machine.id;
    const calls: Record<string, (id: unknown) => Promise<FormState>> = {
      updateUserAction: (id) => userActions.updateUserAction(id as number, initialFormState, formData({ displayName: "Odd", role: "operator" })),
      setUserDisabledAction: (id) => userActions.setUserDisabledAction(id as number, initialFormState, formData({ disabled: "true" })),
      resetPasswordAction: (id) =>
        userActions.resetPasswordAction(id as number, initialFormState, formData({ password: "long-enough-pass", confirmPassword: "long-enough-pass" })),
      updateMachineAction: (id) => machineActions.updateMachineAction(id as number, initialFormState, formData(machineFields())),
    };
    for (const [name, call] of Object.entries(calls)) {
      for (const id of ODD_IDS) {
        const state = await call(id);
        expect(is4xx(state.status), `${name}(${JSON.stringify(id)}) -> ${state.status}`).toBe(true);
      }
    }
    // Real ids still work.
    expect((await calls.updateUserAction!(target.id)).status).toBe(200);
    expect((await calls.updateMachineAction!(machineId)).status).toBe(200);
  });
});

describe("bad input is a clear 4xx, never a 500 (item 8)", () => {
  const CONTROL_NAMES = ["Pat\u0000Floor", "Pat\u0007Floor", "Pat\u001b[31mFloor", "Pat\r\nFloor", "Pat\nFloor", "Pat\u202eroolF"];

  it("control characters in a display name: 422 on create, edit and the JSON API", async () => {
    const target = await makeUser("operator");
    for (const name of CONTROL_NAMES) {
      const created = await userActions.createUserAction(
        initialFormState,
        formData({ email: `ctl-${Math.random().toString(36).slice(2)}@it.cyclegate.test`, displayName: name, role: "operator", password: "long-enough-password" }),
      );
      expect(created.status, JSON.stringify(name)).toBe(422);
      expect(created.fieldErrors?.displayName?.[0]).toBeTruthy();
      const edited = await userActions.updateUserAction(target.id, initialFormState, formData({ displayName: name, role: "operator" }));
      expect(edited.status).toBe(422);
      const patched = await userRoute.PATCH(jsonRequest("PATCH", { displayName: name }), params({ id: String(target.id) }));
      expect(patched.status).toBe(422);
    }
    const [row] = await db().select({ name: users.displayName }).from(users).where(eq(users.id, target.id));
    expect(row?.name).toBe("Test operator");
  });

  it("machine names refuse control characters; notes keep line breaks and tabs but refuse NUL and the rest", async () => {
    for (const name of CONTROL_NAMES) {
      const res = await machinesRoute.POST(jsonRequest("POST", machineFields({ name })), undefined);
      expect(res.status, JSON.stringify(name)).toBe(422);
    }
    for (const notes of ["spindle\u0000", "bell\u0007", "esc\u001b[0m"]) {
      const state = await machineActions.createMachineAction(initialFormState, formData(machineFields({ notes })));
      expect(state.status).toBe(422);
      expect(state.fieldErrors?.notes?.[0]).toBeTruthy();
    }
    const fields = machineFields({ notes: "Bay A\r\nChuck:\tthree-jaw" });
    expect(await actionStatus(() => machineActions.createMachineAction(initialFormState, formData(fields)))).toBe(200);
    const [row] = await db().select({ notes: machines.notes }).from(machines).where(eq(machines.name, fields.name));
    expect(row?.notes).toBe("Bay A\nChuck:\tthree-jaw");
  });

  it("machine numbers must be plain numbers: not hex, arrays, booleans, null or blank", async () => {
    for (const odd of ["0x10", [5], true, null, "", "1e999", "12abc", "Infinity"]) {
      const res = await machinesRoute.POST(jsonRequest("POST", machineFields({ safeZ: odd as never })), undefined);
      expect(res.status, JSON.stringify(odd)).toBe(422);
      const body = (await res.json()) as { issues: { fieldErrors: Record<string, string[]> } };
      expect(body.issues.fieldErrors.safeZ?.[0]).toMatch(/number/);
    }
    const ok = await machinesRoute.POST(jsonRequest("POST", machineFields({ travelXMin: "-300.5" as never, safeZ: "1e1" as never })), undefined);
    expect(ok.status).toBe(201);
    const form = await machineActions.createMachineAction(initialFormState, formData(machineFields({ toolChangeSeconds: "0x10" })));
    expect(form.fieldErrors?.toolChangeSeconds?.[0]).toMatch(/number/);
  });

  it("audit filters: NUL and impossible or far-off dates are 422 with a message", async () => {
    await actAs("lead");
    for (const q of ["actor=%00", "action=session%00", "objectId=1%00", "from=0000-01-01", "to=9999-12-31", "from=2026-02-30", "to=2025-13-01", "from=2026-2-3"]) {
      const res = await auditRoute.GET(jsonRequest("GET", undefined, `http://localhost/api/audit?${q}`), undefined);
      expect(res.status, q).toBe(422);
      const body = (await res.json()) as { error: string; issues: { fieldErrors: Record<string, string[]> } };
      expect(Object.values(body.issues.fieldErrors).flat()[0]).toBeTruthy();
    }
    const fine = await auditRoute.GET(jsonRequest("GET", undefined, "http://localhost/api/audit?from=2024-02-29&to=2030-12-31"), undefined);
    expect(fine.status).toBe(200);
  });

  it("a 247-character sign-in e-mail is a 422, on the API and the form", async () => {
    const email = `${"a".repeat(234)}@example.test`;
    expect(email).toHaveLength(247);
    requestContext.reset("10.80.0.1");
    const res = await sessionRoute.POST(jsonRequest("POST", { email, password: "whatever" }), undefined);
    expect(res.status).toBe(422);
    const state = await signInActions.signInAction(initialFormState, formData({ email, password: "whatever" }));
    expect(state.status).toBe(422);
    expect(state.fieldErrors?.email?.[0]).toBeTruthy();
  });

  it("the JSON check wants application/json itself, parameters allowed", async () => {
    requestContext.reset("10.81.0.1");
    const send = (type: string) =>
      sessionRoute.POST(
        new Request("http://localhost/api/session", {
          method: "POST",
          headers: { "content-type": type },
          body: JSON.stringify({ email: "nobody@it.cyclegate.test", password: "guess" }),
        }),
        undefined,
      );
    for (const type of ["application/json-patch+json", "application/jsonx", "application/json-seq", "text/json", "application/json;", "application/json; charset"]) {
      expect((await send(type)).status, type).toBe(415);
    }
    for (const type of ["application/json", "Application/JSON", "application/json; charset=utf-8", "application/json;charset=UTF-8"]) {
      expect((await send(type)).status, type).toBe(401);
    }
  });
});
