import { PageSkeleton } from "@/components/ui/route-states";

export default function Loading() {
  return <PageSkeleton label="Comparing the revisions" blocks={[5, 12, 24]} />;
}
