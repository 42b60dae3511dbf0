"use client";

import { RouteError } from "@/components/ui/route-error";

export default function ProgramsError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return <RouteError what="The programs" reset={reset} />;
}
