import { redirect } from "next/navigation";
import { Providers } from "@/components/providers";
import { auth } from "@/lib/auth";

export default async function LabAreaLayout({ children }: { children: React.ReactNode }) {
  const session = await auth();
  if (!session?.user?.id) redirect("/sign-in");
  return <Providers>{children}</Providers>;
}
