"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useCallback, useEffect, useRef, useState } from "react";
import { useDropzone } from "react-dropzone";
import type { MachineProfile } from "@/lib/gcode/types";
import { connectionRefusal, describeUploadRefusal, type UploadRefusal } from "@/lib/upload-messages";
import type { BrowserSummary, CheckMessage, CheckRequest } from "./check-messages";
import { formatBytes, formatDuration, plural } from "./format";
import { isSettled, useRevisionState } from "./revision-query";
import { AnalysisBadge } from "./status-badge";

interface UploadTarget {
  programId: number;
  machine: MachineProfile;
  safeZ: number | null;
  partsPerCycle: number;
  /** The server's upload limit, bytes. */
  maxBytes: number;
}

type Check =
  | { state: "running" }
  | { state: "done"; summary: BrowserSummary }
  | { state: "refused"; reason: string }
  | { state: "failed"; reason: string };

type Send =
  | { state: "waiting" }
  | { state: "sending"; loaded: number; total: number }
  | { state: "stored"; revisionId: number; number: number; sha256: string }
  | { state: "refused"; refusal: UploadRefusal }
  | { state: "cancelled"; why: string };

interface Job {
  key: number;
  name: string;
  size: number;
  sha256: string | null;
  hashVia: "web-crypto" | "script" | null;
  check: Check;
  send: Send;
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/**
 * The upload area of a program: drop a file, pick one, or paste text. The browser checks the file at once in a
 * worker (the same engine as the server, with this program's machine) and shows the summary while the bytes go
 * up; it sends the SHA-256 it computed, which the server must match. Then it follows the server's own check.
 */
export function UploadPanel(target: UploadTarget) {
  const router = useRouter();
  const [job, setJob] = useState<Job | null>(null);
  const [note, setNote] = useState("");
  const [pasted, setPasted] = useState("");
  const [pasteName, setPasteName] = useState("pasted.nc");
  const workerRef = useRef<Worker | null>(null);
  const xhrRef = useRef<XMLHttpRequest | null>(null);
  const keyRef = useRef(0);

  const stop = useCallback(() => {
    workerRef.current?.terminate();
    workerRef.current = null;
    xhrRef.current?.abort();
    xhrRef.current = null;
  }, []);
  useEffect(() => stop, [stop]);

  const update = useCallback((key: number, change: (j: Job) => Job) => {
    setJob((j) => (j && j.key === key ? change(j) : j));
  }, []);

  const send = useCallback(
    (key: number, file: Blob, name: string, sha256: string) => {
      const xhr = new XMLHttpRequest();
      xhrRef.current = xhr;
      xhr.open("POST", `/api/programs/${target.programId}/revisions`);
      xhr.setRequestHeader("Content-Type", "application/octet-stream");
      xhr.setRequestHeader("X-Content-SHA256", sha256);
      xhr.setRequestHeader("X-File-Name", encodeURIComponent(name));
      if (note.trim()) xhr.setRequestHeader("X-Revision-Note", encodeURIComponent(note.trim()));
      xhr.responseType = "json";
      xhr.upload.onprogress = (e) => {
        update(key, (j) => ({ ...j, send: { state: "sending", loaded: e.loaded, total: e.lengthComputable ? e.total : file.size } }));
      };
      xhr.onload = () => {
        xhrRef.current = null;
        const body: unknown = xhr.response;
        if (xhr.status === 201) {
          const rev = (body as { revision?: { id: number; number: number; sha256: string } }).revision;
          if (rev) {
            update(key, (j) => ({ ...j, send: { state: "stored", revisionId: rev.id, number: rev.number, sha256: rev.sha256 } }));
            router.refresh();
            return;
          }
        }
        update(key, (j) => ({ ...j, send: { state: "refused", refusal: describeUploadRefusal(xhr.status, body) } }));
      };
      xhr.onerror = () => {
        xhrRef.current = null;
        update(key, (j) => ({ ...j, send: { state: "refused", refusal: connectionRefusal() } }));
      };
      update(key, (j) => ({ ...j, send: { state: "sending", loaded: 0, total: file.size } }));
      xhr.send(file);
    },
    [note, router, target.programId, update],
  );

  const start = useCallback(
    (file: Blob, name: string) => {
      stop();
      const key = ++keyRef.current;
      setJob({ key, name, size: file.size, sha256: null, hashVia: null, check: { state: "running" }, send: { state: "waiting" } });
      if (file.size === 0) {
        setJob((j) => j && { ...j, check: { state: "refused", reason: "the file is empty" }, send: { state: "cancelled", why: "Nothing was sent." } });
        return;
      }
      if (file.size > target.maxBytes) {
        // The server would answer 413 at once; say so without sending.
        setJob((j) =>
          j && {
            ...j,
            check: { state: "refused", reason: `the file is over the upload limit of ${formatBytes(target.maxBytes)}` },
            send: { state: "refused", refusal: describeUploadRefusal(413, { error: `The file is larger than the limit of ${formatBytes(target.maxBytes)}.` }) },
          },
        );
        return;
      }
      const worker = new Worker(new URL("./check-worker.ts", import.meta.url), { type: "module" });
      workerRef.current = worker;
      worker.onmessage = (e: MessageEvent<CheckMessage>) => {
        const m = e.data;
        if (m.type === "hash") {
          update(key, (j) => ({ ...j, sha256: m.sha256, hashVia: m.via }));
          send(key, file, name, m.sha256);
        } else if (m.type === "refused") {
          // The server applies the same rule: stop sending rather than push bytes it will refuse.
          xhrRef.current?.abort();
          xhrRef.current = null;
          update(key, (j) => ({
            ...j,
            check: { state: "refused", reason: m.reason },
            send: j.send.state === "stored" ? j.send : { state: "cancelled", why: "The upload was stopped; nothing was stored." },
          }));
          worker.terminate();
        } else if (m.type === "summary") {
          update(key, (j) => ({ ...j, check: { state: "done", summary: m.summary } }));
          worker.terminate();
        } else {
          update(key, (j) => ({ ...j, check: { state: "failed", reason: m.reason } }));
          worker.terminate();
        }
      };
      worker.onerror = () => {
        update(key, (j) => ({ ...j, check: { state: "failed", reason: "the check could not run in this browser" } }));
      };
      const request: CheckRequest = {
        file,
        machine: target.machine,
        safeZ: target.safeZ ?? undefined,
        parts: target.partsPerCycle,
      };
      worker.postMessage(request);
    },
    [send, stop, target.machine, target.maxBytes, target.partsPerCycle, target.safeZ, update],
  );

  const { getRootProps, getInputProps, isDragActive, open } = useDropzone({
    multiple: false,
    noClick: true,
    noKeyboard: true,
    onDropAccepted: (files) => {
      const f = files[0];
      if (f) start(f, f.name);
    },
  });

  const busy = job !== null && (job.send.state === "sending" || job.send.state === "waiting") && job.check.state !== "refused";

  return (
    <div className="space-y-4" data-testid="upload-panel">
      <div
        data-testid="drop-zone"
        {...getRootProps({
          className: `rounded-lg border-2 border-dashed p-6 text-center transition-colors ${
            isDragActive ? "border-brand bg-brand/5" : "border-rule bg-paper/50"
          }`,
        })}
      >
        <input {...getInputProps({ "aria-label": "Program file" })} data-testid="upload-input" />
        <p className="font-medium">{isDragActive ? "Drop it to check and upload" : "Drop an NC program here"}</p>
        <p className="mt-1 text-sm text-ink-soft">
          It is checked in your browser at once and stored exactly as it is, byte for byte (up to {formatBytes(target.maxBytes)}).
        </p>
        <button type="button" onClick={open} disabled={busy} className="mt-3 min-h-10 rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white hover:bg-brand-strong disabled:opacity-60">
          Choose a file…
        </button>
      </div>
      <div className="grid gap-3 lg:grid-cols-2">
        <label className="block text-sm">
          <span className="mb-1 block font-medium">Note for this revision (optional)</span>
          <input
            value={note}
            onChange={(e) => setNote(e.target.value)}
            maxLength={2000}
            placeholder="What changed"
            className="w-full rounded-md border border-rule bg-white px-3 py-2"
          />
        </label>
        <details className="rounded-md border border-rule bg-panel p-3 text-sm">
          <summary className="cursor-pointer font-medium">Paste program text instead</summary>
          <div className="mt-2 space-y-2">
            <label className="block">
              <span className="mb-1 block">File name</span>
              <input value={pasteName} onChange={(e) => setPasteName(e.target.value)} maxLength={120} className="w-full rounded-md border border-rule px-3 py-2" />
            </label>
            <label className="block">
              <span className="mb-1 block">Program text</span>
              <textarea
                value={pasted}
                onChange={(e) => setPasted(e.target.value)}
                rows={6}
                spellCheck={false}
                className="w-full rounded-md border border-rule px-3 py-2 font-mono text-xs"
                placeholder={"%\nO1001\nG21 G90 G17\n…"}
              />
            </label>
            <button
              type="button"
              disabled={busy || pasted.length === 0}
              onClick={() => start(new Blob([pasted], { type: "text/plain" }), pasteName.trim() || "pasted.nc")}
              className="min-h-10 rounded-md border border-rule bg-white px-4 py-2 font-semibold hover:bg-paper disabled:opacity-60"
            >
              Check and upload the text
            </button>
          </div>
        </details>
      </div>
      {job && <UploadProgress job={job} />}
    </div>
  );
}

function UploadProgress({ job }: { job: Job }) {
  const { check, send } = job;
  return (
    <section aria-label="Upload" aria-live="polite" className="space-y-4 rounded-lg border border-rule bg-panel p-4" data-testid="upload-progress">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h3 className="font-semibold break-all">{job.name}</h3>
        <span className="text-sm text-ink-soft tabular-nums">{formatBytes(job.size)}</span>
      </div>

      <div className="grid gap-4 lg:grid-cols-2">
        <div className="space-y-2">
          <h4 className="text-sm font-semibold uppercase tracking-wide text-ink-soft">Checked in your browser</h4>
          {check.state === "running" && <p role="status">Checking…</p>}
          {check.state === "refused" && (
            <p role="alert" className="rounded-md bg-bad/10 px-3 py-2 text-sm text-bad">
              {capitalise(check.reason)}. The server refuses such files too.
            </p>
          )}
          {check.state === "failed" && <p className="text-sm text-ink-soft">{capitalise(check.reason)}; the server&apos;s check below still counts.</p>}
          {check.state === "done" && <BrowserSummaryView summary={check.summary} />}
          {job.sha256 && (
            <p className="text-xs text-ink-soft">
              SHA-256 <code className="break-all font-mono text-ink" data-testid="browser-sha256">{job.sha256}</code>
              {job.hashVia === "script" && " (computed by script: this page is not on a secure connection)"}
            </p>
          )}
        </div>

        <div className="space-y-2">
          <h4 className="text-sm font-semibold uppercase tracking-wide text-ink-soft">Sent to the vault</h4>
          <SendView send={send} size={job.size} browserSha={job.sha256} />
        </div>
      </div>
    </section>
  );
}

function BrowserSummaryView({ summary: s }: { summary: BrowserSummary }) {
  return (
    <div data-testid="browser-summary">
      <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-3">
        <div>
          <dt className="text-ink-soft">Units</dt>
          <dd className="font-medium">{s.units}</dd>
        </div>
        <div>
          <dt className="text-ink-soft">Lines</dt>
          <dd className="font-medium tabular-nums">{s.lineCount.toLocaleString("en")}</dd>
        </div>
        <div>
          <dt className="text-ink-soft">Work offsets</dt>
          <dd className="font-medium" data-testid="browser-offsets">{s.workOffsets.join(", ") || "none"}</dd>
        </div>
        <div>
          <dt className="text-ink-soft">Tools</dt>
          <dd className="font-medium tabular-nums" data-testid="browser-tools">
            {s.tools.length === 0 ? "none" : s.tools.map((t) => `T${t.number}`).join(" ")}
          </dd>
        </div>
        <div>
          <dt className="text-ink-soft">Run time (estimate)</dt>
          <dd className="font-medium tabular-nums">{formatDuration(s.totalSeconds)}</dd>
        </div>
        <div>
          <dt className="text-ink-soft">Findings</dt>
          <dd className="font-medium" data-testid="browser-errors">
            <span className={s.errors > 0 ? "text-bad" : ""}>{plural(s.errors, "error")}</span>, {plural(s.warnings, "warning")}
          </dd>
        </div>
      </dl>
      {s.firstErrors.length > 0 && (
        <ul className="mt-2 space-y-1 text-sm">
          {s.firstErrors.map((f, i) => (
            <li key={i} className="text-bad">
              Line {f.line}: {f.message}
            </li>
          ))}
        </ul>
      )}
      <p className="mt-1 text-xs text-ink-soft">Checked in {s.ms} ms with this program&apos;s machine.</p>
    </div>
  );
}

function SendView({ send, size, browserSha }: { send: Send; size: number; browserSha: string | null }) {
  if (send.state === "waiting") return <p className="text-sm text-ink-soft">Computing the SHA-256 first…</p>;
  if (send.state === "cancelled") return <p className="text-sm text-ink-soft">{send.why}</p>;
  if (send.state === "refused") {
    const r = send.refusal;
    return (
      <div role="alert" className="rounded-md bg-bad/10 px-3 py-2 text-sm text-bad" data-testid="upload-error" data-status={r.status}>
        <p className="font-semibold">
          {r.title}
          {r.status > 0 && <span className="font-normal"> ({r.status})</span>}
        </p>
        <p>{r.detail}</p>
        {r.issues.length > 0 && (
          <ul className="mt-1 list-disc pl-5">
            {r.issues.map((m) => (
              <li key={m} className="break-all">{m}</li>
            ))}
          </ul>
        )}
      </div>
    );
  }
  if (send.state === "sending") {
    const total = send.total || size || 1;
    const pct = Math.min(100, Math.round((send.loaded / total) * 100));
    return (
      <div className="space-y-1">
        <div
          role="progressbar"
          aria-label="Bytes sent"
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={pct}
          aria-valuetext={`${pct}% (${formatBytes(send.loaded)} of ${formatBytes(total)})`}
          data-testid="upload-progressbar"
          className="h-3 overflow-hidden rounded-full bg-rule"
        >
          <div className="h-full bg-brand transition-[width]" style={{ width: `${pct}%` }} />
        </div>
        <p className="text-sm tabular-nums">
          {pct === 100 ? "All bytes sent; the server is storing them…" : `${formatBytes(send.loaded)} of ${formatBytes(total)} sent`}
        </p>
      </div>
    );
  }
  return <StoredView revisionId={send.revisionId} number={send.number} serverSha={send.sha256} browserSha={browserSha} />;
}

function StoredView({ revisionId, number, serverSha, browserSha }: { revisionId: number; number: number; serverSha: string; browserSha: string | null }) {
  const { data, error } = useRevisionState(revisionId);
  const state = data?.analysis?.state ?? "queued";
  return (
    <div className="space-y-2 text-sm" data-testid="upload-stored">
      <div role="progressbar" aria-label="Bytes sent" aria-valuemin={0} aria-valuemax={100} aria-valuenow={100} className="h-3 overflow-hidden rounded-full bg-rule">
        <div className="h-full w-full bg-ok" />
      </div>
      <p>
        Stored as <strong>revision {number}</strong> (draft).{" "}
        {browserSha === serverSha ? (
          <span className="text-ok" data-testid="sha-match">The server&apos;s SHA-256 matches the one computed here.</span>
        ) : (
          <span className="text-bad">The server&apos;s SHA-256 differs from the one computed here.</span>
        )}
      </p>
      <p className="flex items-center gap-2">
        Server check: <AnalysisBadge state={state} />
        {data?.analysis?.state === "failed" && <span className="text-bad">{data.analysis.error}</span>}
        {error && <span className="text-bad">Could not ask the server ({error.message}); retrying.</span>}
      </p>
      {isSettled(data) && data?.analysis?.state === "done" && (
        <p className="tabular-nums">
          {plural(data.analysis.errorCount ?? 0, "error")}, {plural(data.analysis.warningCount ?? 0, "warning")}, about{" "}
          {formatDuration(data.analysis.totalSeconds)}.
        </p>
      )}
      <Link href={`/revisions/${revisionId}`} className="inline-block rounded-md bg-brand px-4 py-2 font-semibold text-white hover:bg-brand-strong" data-testid="open-revision">
        Open revision {number}
      </Link>
    </div>
  );
}
