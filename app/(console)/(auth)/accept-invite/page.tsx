import type { Metadata } from "next";
import Link from "next/link";
import { Alert } from "@/components/ui/alert";
import { AcceptInviteForm } from "./accept-invite-client";

export const metadata: Metadata = { title: "Accept invitation" };

export default async function AcceptInvitePage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { token } = await searchParams;
  const value = Array.isArray(token) ? token[0] : token;
  return (
    <>
      <h1 className="mb-4">Join your organisation</h1>
      {value === undefined ? (
        <div className="flex flex-col gap-4">
          <Alert tone="warning">Open this page from the link in your invitation e-mail.</Alert>
          <Link href="/sign-in">Already have an account? Sign in</Link>
        </div>
      ) : (
        <AcceptInviteForm token={value} />
      )}
    </>
  );
}
