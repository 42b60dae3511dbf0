"use client";

import { queryOptions, useQuery } from "@tanstack/react-query";
import { z } from "zod";

/** The part of GET /api/revisions/{id} the pages poll: status, hash and the analysis state. */
const revisionStateSchema = z.object({
  revision: z.object({
    id: z.number(),
    number: z.number(),
    status: z.enum(["draft", "submitted", "released", "rejected", "superseded"]),
    sha256: z.string(),
    analysis: z
      .object({
        state: z.enum(["queued", "running", "done", "failed"]),
        error: z.string().nullable(),
        attempts: z.number(),
        errorCount: z.number().nullable(),
        warningCount: z.number().nullable(),
        totalSeconds: z.number().nullable(),
      })
      .nullable(),
  }),
});

export type RevisionState = z.infer<typeof revisionStateSchema>["revision"];

const POLL_MS = 1000;

export const isSettled = (r: RevisionState | undefined) => r?.analysis?.state === "done" || r?.analysis?.state === "failed";

export function revisionStateQuery(id: number) {
  return queryOptions({
    queryKey: ["revision-state", id],
    queryFn: async ({ signal }): Promise<RevisionState> => {
      const res = await fetch(`/api/revisions/${id}`, { signal, headers: { accept: "application/json" } });
      if (!res.ok) throw new Error(res.status === 404 ? "The revision is gone." : `The server answered ${res.status}.`);
      return revisionStateSchema.parse(await res.json()).revision;
    },
    // Poll while the server's check is queued or running; stop once it is done or failed.
    refetchInterval: (q) => (isSettled(q.state.data) ? false : POLL_MS),
    staleTime: 0,
  });
}

/** A revision's analysis state, polled until the server's check has finished. */
export function useRevisionState(id: number | null) {
  return useQuery({ ...revisionStateQuery(id ?? 0), enabled: id !== null });
}
