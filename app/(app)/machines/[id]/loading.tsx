import { PageSkeleton } from "@/components/ui/route-states";

export default function Loading() {
  return <PageSkeleton label="Loading the machine" blocks={[4, 14]} />;
}
