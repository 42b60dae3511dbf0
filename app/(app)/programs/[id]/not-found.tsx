import { MissingPanel } from "@/components/ui/route-states";

export default function ProgramNotFound() {
  return <MissingPanel what="Program" back="/programs" backLabel="All programs" />;
}
