import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { devMailEnabled } from "@/lib/env";
import { DevMailPanel } from "./dev-mail-client";

export const metadata: Metadata = { title: "Dev mail" };

// Exists only while the server runs the local mail catcher (development, tests, or RILLSCALE_DEV_MAIL=1).
export default async function DevMailPage() {
  await connection();
  if (!devMailEnabled()) notFound();
  return <DevMailPanel />;
}
