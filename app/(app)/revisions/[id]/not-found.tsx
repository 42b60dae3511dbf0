import { MissingPanel } from "@/components/ui/route-states";

export default function RevisionNotFound() {
  return <MissingPanel what="Revision" back="/programs" backLabel="All programs" hint="A draft may have been deleted, or the address is mistyped." />;
}
