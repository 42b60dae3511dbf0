import { MissingPanel } from "@/components/ui/route-states";

export default function CompareNotFound() {
  return <MissingPanel what="Revision to compare" back="/programs" backLabel="All programs" hint="One of the two revisions does not exist (a draft may have been deleted)." />;
}
