import { PageSkeleton } from "@/components/ui/route-states";

export default function Loading() {
  return <PageSkeleton label="Loading programs" blocks={[4, 8, 24]} />;
}
