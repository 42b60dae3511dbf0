"use client";

import { useRouter } from "next/navigation";
import { useEffect, useRef } from "react";
import { isSettled, useRevisionState } from "./revision-query";

function Watch({ id, onSettled }: { id: number; onSettled: () => void }) {
  const { data } = useRevisionState(id);
  const settled = isSettled(data);
  const fired = useRef(false);
  useEffect(() => {
    if (settled && !fired.current) {
      fired.current = true;
      onSettled();
    }
  }, [settled, onSettled]);
  return null;
}

/**
 * Polls the server's check of revisions still queued or running, and re-renders the page (server data) as soon as
 * one finishes, so its summary appears without a manual reload.
 */
export function RefreshWhenChecked({ revisionIds }: { revisionIds: number[] }) {
  const router = useRouter();
  if (revisionIds.length === 0) return null;
  return (
    <>
      <p role="status" className="text-sm text-ink-soft">
        The server is checking {revisionIds.length === 1 ? "a revision" : `${revisionIds.length} revisions`}; this page updates when it is done.
      </p>
      {revisionIds.slice(0, 5).map((id) => (
        <Watch key={id} id={id} onSettled={() => router.refresh()} />
      ))}
    </>
  );
}
