"use client";

import { useActionState, useState } from "react";
import { FormMessage, SubmitButton, TextField } from "@/components/ui/form";
import type { TokenView } from "@/lib/dal/tokens";
import { formatWhen } from "./format";

interface TokenState {
  status: number;
  message?: string;
  fieldErrors?: Record<string, string[]>;
  values?: Record<string, string>;
  token?: string;
}
type Action = (prev: TokenState, fd: FormData) => Promise<TokenState>;

function CopyButton({ text }: { text: string }) {
  const [copied, setCopied] = useState<"yes" | "no" | null>(null);
  return (
    <button
      type="button"
      onClick={async () => {
        try {
          await navigator.clipboard.writeText(text);
          setCopied("yes");
        } catch {
          setCopied("no");
        }
      }}
      className="rounded-md border border-rule bg-white px-3 py-1.5 text-sm font-semibold hover:bg-paper"
    >
      {copied === "yes" ? "Copied" : copied === "no" ? "Select and copy it by hand" : "Copy"}
    </button>
  );
}

/** Creates a token and shows it once, with a copy button and a curl line that pushes a program with it. */
export function CreateTokenForm({ action, appUrl }: { action: Action; appUrl: string }) {
  const [state, formAction] = useActionState(action, { status: 0 });
  const curl = state.token
    ? `curl -H "Authorization: Bearer ${state.token}" --data-binary @O1001.nc \\\n  "${appUrl}/api/revisions?program=O1001&machine=Bench%20mill%201&part=FH-2207"`
    : "";
  return (
    <div className="space-y-3">
      <form action={formAction} noValidate className="flex flex-wrap items-start gap-3" key={state.token ?? "new"}>
        <div className="min-w-64 flex-1">
          <TextField label="Name of the new token" name="name" placeholder="Post-processor on the CAM workstation" defaultValue={state.token ? "" : (state.values?.name ?? "")} errors={state.fieldErrors} />
        </div>
        <div className="pt-6">
          <SubmitButton>Create token</SubmitButton>
        </div>
      </form>
      <FormMessage state={state} />
      {state.token && (
        <div className="space-y-2 rounded-md border border-warn/40 bg-warn/10 p-3" data-testid="new-token">
          <p className="text-sm font-semibold">Your new token (shown only now):</p>
          <div className="flex flex-wrap items-center gap-2">
            <code className="break-all rounded bg-white px-2 py-1 font-mono text-sm" data-testid="token-value">
              {state.token}
            </code>
            <CopyButton text={state.token} />
          </div>
          <p className="text-sm">Push a posted file with it (the program and part are found by number, or created on the first push):</p>
          <pre className="overflow-x-auto rounded bg-ink p-3 font-mono text-xs text-white">{curl}</pre>
          <CopyButton text={curl} />
        </div>
      )}
    </div>
  );
}

function RevokeButton({ action, name }: { action: Action; name: string }) {
  const [state, formAction] = useActionState(action, { status: 0 });
  return (
    <form action={formAction}>
      <button type="submit" className="text-sm text-bad hover:underline" aria-label={`Revoke ${name}`}>
        Revoke
      </button>
      {state.status >= 400 && <span className="ml-2 text-sm text-bad">{state.message}</span>}
    </form>
  );
}

/** The caller's tokens with their last use; live ones can be revoked. */
export function TokenList({ tokens, revoke }: { tokens: TokenView[]; revoke: (id: number, prev: TokenState, fd: FormData) => Promise<TokenState> }) {
  if (tokens.length === 0) return <p className="text-sm text-ink-soft">You have no API tokens.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm" data-testid="tokens">
        <thead className="border-b border-rule text-xs uppercase tracking-wide text-ink-soft">
          <tr>
            <th className="py-2 pr-3">Name</th>
            <th className="py-2 pr-3">Starts with</th>
            <th className="py-2 pr-3">Created</th>
            <th className="py-2 pr-3">Last used</th>
            <th className="py-2">State</th>
          </tr>
        </thead>
        <tbody>
          {tokens.map((t) => (
            <tr key={t.id} className="border-b border-rule/60 last:border-0" data-token={t.name}>
              <td className="py-2 pr-3 font-medium">{t.name}</td>
              <td className="py-2 pr-3 font-mono text-xs">{t.prefix}…</td>
              <td className="py-2 pr-3 tabular-nums">{formatWhen(t.createdAt)}</td>
              <td className="py-2 pr-3 tabular-nums">{t.lastUsedAt ? formatWhen(t.lastUsedAt) : "never"}</td>
              <td className="py-2">
                {t.revokedAt ? (
                  <span className="text-ink-soft">revoked {formatWhen(t.revokedAt)}</span>
                ) : (
                  <RevokeButton action={revoke.bind(null, t.id)} name={t.name} />
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
