import type { Metadata } from "next";
import { RequestResetForm, SetPasswordForm } from "./reset-password-client";

export const metadata: Metadata = { title: "Reset password" };

// Without a token: ask for the e-mail link. With the token from that link: choose the new password.
export default async function ResetPasswordPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { token } = await searchParams;
  const value = Array.isArray(token) ? token[0] : token;
  return (
    <>
      <h1 className="mb-4">{value === undefined ? "Reset your password" : "Choose a new password"}</h1>
      {value === undefined ? <RequestResetForm /> : <SetPasswordForm token={value} />}
    </>
  );
}
