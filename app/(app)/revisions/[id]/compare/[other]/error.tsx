"use client";

import { RouteError } from "@/components/ui/route-error";

export default function CompareError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return <RouteError what="The comparison" reset={reset} />;
}
