import { PageSkeleton } from "@/components/ui/route-states";

export default function Loading() {
  return <PageSkeleton label="Loading the program" blocks={[6, 4, 16, 12]} />;
}
