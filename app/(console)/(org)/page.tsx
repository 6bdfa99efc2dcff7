import type { Metadata } from "next";
import { OverviewPanel } from "./overview-client";

export const metadata: Metadata = { title: "Overview" };

export default function OverviewPage() {
  return <OverviewPanel />;
}
