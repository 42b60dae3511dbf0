import type { Metadata } from "next";
import { CreateTokenForm, TokenList } from "@/components/vault/token-manager";
import { requirePageUser } from "@/lib/auth/page-guard";
import { can, ROLE_LABELS } from "@/lib/auth/roles";
import { listMyTokens } from "@/lib/dal/tokens";
import { env } from "@/lib/env";
import { createTokenAction, revokeTokenAction } from "./actions";
import { PasswordForm } from "./password-form";

export const metadata: Metadata = { title: "Your account" };

export default async function AccountPage() {
  const user = await requirePageUser();
  const tokens = can(user.role, "manageOwnTokens") ? await listMyTokens() : null;
  return (
    <div className="space-y-6">
      <section className="max-w-lg space-y-4 rounded-lg border border-rule bg-panel p-6">
        <h1 className="text-2xl font-semibold">Your account</h1>
        <p className="text-ink-soft">
          {user.email} · {ROLE_LABELS[user.role]}
        </p>
        <h2 className="text-lg font-semibold">Change password</h2>
        <p className="text-sm text-ink-soft">Changing it signs you out everywhere, this device included.</p>
        <PasswordForm email={user.email} />
      </section>
      {tokens && (
        <section className="space-y-4 rounded-lg border border-rule bg-panel p-6" aria-labelledby="tokens">
          <h2 id="tokens" className="text-lg font-semibold">API tokens for CAM posts</h2>
          <p className="text-sm text-ink-soft">
            A post-processor pushes programs with a token instead of your password. Each token is shown once, stored only as a hash, and works on the JSON API
            only; revoke one as soon as it may have leaked.
          </p>
          <CreateTokenForm action={createTokenAction} appUrl={env().appUrl} />
          <TokenList tokens={tokens} revoke={revokeTokenAction} />
        </section>
      )}
    </div>
  );
}
