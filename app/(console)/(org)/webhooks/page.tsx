import type { Metadata } from "next";
import { WebhooksPanel } from "./webhooks-client";

export const metadata: Metadata = { title: "Webhooks" };

export default function WebhooksPage() {
  return <WebhooksPanel />;
}
