"use client";

import { RouteError } from "@/components/ui/route-error";

export default function RevisionError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return <RouteError what="This revision" reset={reset} />;
}
