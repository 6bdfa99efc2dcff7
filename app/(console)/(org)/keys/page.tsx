import type { Metadata } from "next";
import { KeysPanel } from "./keys-client";

export const metadata: Metadata = { title: "API keys" };

export default function KeysPage() {
  return <KeysPanel />;
}
