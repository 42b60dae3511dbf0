"use client";

import { RouteError } from "@/components/ui/route-error";

export default function RunsError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return <RouteError what="The record of runs" reset={reset} />;
}
