import { AppHeader } from "@/components/ui/app-header";
import { requirePageUser } from "@/lib/auth/page-guard";

export const dynamic = "force-dynamic";

export default async function SignedInLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser();
  return (
    <>
      <AppHeader user={user} />
      <main className="mx-auto max-w-7xl px-4 py-6">{children}</main>
    </>
  );
}
