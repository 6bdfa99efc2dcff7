import type { Metadata } from "next";
import { AuditPanel } from "./audit-client";

export const metadata: Metadata = { title: "Audit log" };

export default function AuditPage() {
  return <AuditPanel />;
}
