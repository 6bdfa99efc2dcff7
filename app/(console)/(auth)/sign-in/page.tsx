import type { Metadata } from "next";
import { safeNextPath } from "@/components/shell/safe-next";
import { SignInForm } from "./sign-in-client";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { next } = await searchParams;
  return (
    <>
      <h1 className="mb-4">Sign in</h1>
      <SignInForm next={safeNextPath(next)} />
    </>
  );
}
