import { MissingPanel } from "@/components/ui/route-states";

export default function MachineNotFound() {
  return <MissingPanel what="Machine" back="/machines" backLabel="All machines" />;
}
