import type { Metadata } from "next";
import { MembersPanel } from "./members-client";

export const metadata: Metadata = { title: "Members" };

export default function MembersPage() {
  return <MembersPanel />;
}
