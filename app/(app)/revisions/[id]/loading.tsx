import { PageSkeleton } from "@/components/ui/route-states";

export default function Loading() {
  return <PageSkeleton label="Loading the revision" blocks={[5, 4, 8, 36]} />;
}
