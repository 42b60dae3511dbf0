"use client";

import { RouteError } from "@/components/ui/route-error";

export default function ProgramError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return <RouteError what="This program" reset={reset} />;
}
