import { connection } from "next/server";
import type { ReactNode } from "react";
import { devMailEnabled } from "@/lib/env";
import { OrgShell } from "@/components/shell/org-shell";

// The signed-in console. Whether the development mail catcher runs is a property of the running
// server, not of the build, so it is read per request.
export default async function OrgLayout({ children }: { children: ReactNode }) {
  await connection();
  return <OrgShell devMail={devMailEnabled()}>{children}</OrgShell>;
}
