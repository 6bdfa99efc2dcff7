import type { Metadata } from "next";
import { SigningKeysPanel } from "./signing-keys-client";

export const metadata: Metadata = { title: "Signing keys" };

export default function SigningKeysPage() {
  return <SigningKeysPanel />;
}
