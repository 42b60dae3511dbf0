import "server-only";
import { asc, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { sessions, users, type Role } from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { isUniqueViolation } from "@/lib/db-errors";
import { RequestError } from "@/lib/auth/errors";
import { rememberDevice } from "@/lib/auth/device";
import { hashPassword } from "@/lib/auth/password";
import { requireOwnPassword } from "@/lib/auth/reauth";
import { authorize, requestIp, requireUser } from "@/lib/auth/session";
import { clearAccountLimits } from "@/lib/auth/throttle";

export interface UserListItem {
  id: number;
  email: string;
  name: string;
  role: Role;
  disabled: boolean;
  createdAt: string;
}

const listColumns = {
  id: users.id,
  email: users.email,
  name: users.displayName,
  role: users.role,
  disabled: users.disabled,
  createdAt: users.createdAt,
};

const toItem = (r: { createdAt: Date } & Omit<UserListItem, "createdAt">): UserListItem => ({
  ...r,
  createdAt: r.createdAt.toISOString(),
});

export async function listUsers(): Promise<UserListItem[]> {
  await authorize("manageUsers");
  const rows = await db().select(listColumns).from(users).orderBy(asc(users.displayName));
  return rows.map(toItem);
}

export async function getUser(id: number): Promise<UserListItem | null> {
  await authorize("manageUsers");
  const [row] = await db().select(listColumns).from(users).where(eq(users.id, id)).limit(1);
  return row ? toItem(row) : null;
}


export async function createUser(input: {
  email: string;
  displayName: string;
  role: Role;
  password: string;
}): Promise<UserListItem> {
  const actor = await authorize("manageUsers");
  const passwordHash = await hashPassword(input.password);
  const ip = await requestIp();
  try {
    return await db().transaction(async (tx) => {
      const [row] = await tx
        .insert(users)
        .values({ email: input.email, displayName: input.displayName, role: input.role, passwordHash })
        .returning(listColumns);
      if (!row) throw new Error("insert returned nothing");
      await recordEvent(
        { actor, action: "user.create", objectType: "user", objectId: row.id, details: { email: row.email, role: row.role }, ip },
        tx,
      );
      return toItem(row);
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw new RequestError(409, "A user with this e-mail already exists.", { email: ["A user with this e-mail already exists."] });
    throw e;
  }
}

/** Role, name, disable/enable and password reset; anything that changes access ends the user's sessions. */
export async function updateUser(
  id: number,
  change: { displayName?: string; role?: Role; disabled?: boolean; password?: string },
): Promise<UserListItem> {
  const actor = await authorize("manageUsers");
  if (id === actor.id && (change.disabled === true || (change.role && change.role !== "admin"))) {
    throw new RequestError(409, "You cannot disable yourself or take away your own admin role.");
  }
  const passwordHash = change.password ? await hashPassword(change.password) : undefined;
  const ip = await requestIp();
  const row = await db().transaction(async (tx) => {
    const [before] = await tx
      .select({ role: users.role, disabled: users.disabled, name: users.displayName })
      .from(users)
      .where(eq(users.id, id))
      .for("update");
    if (!before) throw new RequestError(404, "No such user.");
    const endsSessions =
      passwordHash !== undefined ||
      (change.disabled !== undefined && change.disabled !== before.disabled) ||
      (change.role !== undefined && change.role !== before.role);
    const [row] = await tx
      .update(users)
      .set({
        ...(change.displayName !== undefined && { displayName: change.displayName }),
        ...(change.role !== undefined && { role: change.role }),
        ...(change.disabled !== undefined && { disabled: change.disabled }),
        ...(passwordHash !== undefined && { passwordHash }),
        ...(endsSessions && { sessionVersion: sql`${users.sessionVersion} + 1` }),
        updatedAt: sql`now()`,
      })
      .where(eq(users.id, id))
      .returning(listColumns);
    if (!row) throw new RequestError(404, "No such user.");
    if (endsSessions) {
      await tx.update(sessions).set({ revokedAt: sql`now()` }).where(eq(sessions.userId, id));
    }
    const details: Record<string, unknown> = {};
    if (change.displayName !== undefined && change.displayName !== before.name) details.name = { from: before.name, to: change.displayName };
    if (change.role !== undefined && change.role !== before.role) details.role = { from: before.role, to: change.role };
    if (change.disabled !== undefined && change.disabled !== before.disabled) details.disabled = change.disabled;
    if (passwordHash !== undefined) details.passwordReset = true;
    const action =
      change.disabled === true && !before.disabled
        ? "user.disable"
        : change.disabled === false && before.disabled
          ? "user.enable"
          : passwordHash !== undefined && Object.keys(details).length === 1
            ? "user.password-reset"
            : "user.update";
    await recordEvent({ actor, action, objectType: "user", objectId: id, details, ip }, tx);
    return toItem(row);
  });
  // A reset is also how an admin lets a user back in whom failed guesses from elsewhere hold back.
  if (passwordHash !== undefined) await clearAccountLimits(row.email);
  return row;
}

/**
 * The signed-in user's own password, after re-entering the current one (counted and audited like a
 * sign-in). Every session of theirs ends and the caller signs in again; this browser stays trusted.
 */
export async function changeOwnPassword(currentPassword: string, newPassword: string): Promise<void> {
  const me = await requireUser();
  await requireOwnPassword(me, currentPassword, "password-change", "currentPassword");
  const passwordHash = await hashPassword(newPassword);
  const ip = await requestIp();
  await db().transaction(async (tx) => {
    await tx
      .update(users)
      .set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: sql`now()` })
      .where(eq(users.id, me.id));
    await tx.update(sessions).set({ revokedAt: sql`now()` }).where(eq(sessions.userId, me.id));
    await recordEvent({ actor: me, action: "user.password-change", objectType: "user", objectId: me.id, ip }, tx);
  });
  await rememberDevice({ id: me.id, passwordHash });
}
