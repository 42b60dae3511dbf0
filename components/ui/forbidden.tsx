import { ROLE_LABELS } from "@/lib/auth/roles";
import type { Role } from "@/db/schema";

/** The refusal a signed-in user sees on a page their role may not open (answered with 403). */
export function Forbidden({ role }: { role?: Role }) {
  return (
    <section className="rounded-lg border border-rule bg-panel p-6">
      <h1 className="text-xl font-semibold">Not for your role</h1>
      <p className="mt-2 text-ink-soft">
        {role ? `The ${ROLE_LABELS[role].toLowerCase()} role` : "Your role"} does not allow this page. Ask an admin if you need it.
      </p>
    </section>
  );
}
