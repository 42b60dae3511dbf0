import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { getCurrentUser } from "@/lib/auth/session";
import { safeRedirectPath } from "@/lib/safe-redirect";
import { SignInForm } from "./sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string | string[]; changed?: string | string[] }> }) {
  const sp = await searchParams;
  const next = safeRedirectPath(sp.next);
  if (await getCurrentUser()) redirect(next);
  return (
    <main className="mx-auto flex min-h-dvh max-w-md flex-col justify-center px-6 py-12">
      <div className="mb-8">
        <p className="text-3xl font-bold tracking-tight">
          Cycle<span className="text-brand">gate</span>
        </p>
        <p className="mt-2 text-ink-soft">Program vault and pre-run checks for the shop floor.</p>
      </div>
      <section className="rounded-lg border border-rule bg-panel p-6 shadow-sm">
        <h1 className="mb-4 text-xl font-semibold">Sign in</h1>
        {sp.changed === "1" && (
          <p role="status" className="mb-4 rounded-md bg-ok/10 px-3 py-2 text-sm text-ok">
            Password changed. Sign in with the new one.
          </p>
        )}
        <SignInForm next={next} />
      </section>
    </main>
  );
}
