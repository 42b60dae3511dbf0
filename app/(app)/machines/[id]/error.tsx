"use client";

import { RouteError } from "@/components/ui/route-error";

export default function MachineError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return <RouteError what="This machine" reset={reset} />;
}
