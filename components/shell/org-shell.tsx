"use client";

import { useMutation } from "@tanstack/react-query";
import Link from "next/link";
import { usePathname, useRouter } from "next/navigation";
import { useEffect, type ReactNode } from "react";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { allows, useMe } from "@/components/data/use-me";
import { NAV_ITEMS } from "@/components/shell/nav";
import { TopBar } from "@/components/shell/top-bar";
import { Alert } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";

export interface OrgShellProps {
  devMail: boolean;
  children: ReactNode;
}

// The signed-in frame: who and where you are, what you may open, and signing out.
export function OrgShell({ devMail, children }: OrgShellProps) {
  const me = useMe();
  const router = useRouter();
  const pathname = usePathname();
  const unauthenticated = me.error instanceof ApiProblem && me.error.status === 401;

  useEffect(() => {
    if (unauthenticated) router.replace(`/sign-in?next=${encodeURIComponent(pathname)}`);
  }, [unauthenticated, pathname, router]);

  const signOut = useMutation({
    mutationFn: (everywhere: boolean) => api<void>(everywhere ? "/sessions" : "/session", { method: "DELETE" }),
    // A full page load rather than a client navigation: nothing fetched for the old session stays in memory,
    // and the shell cannot race the navigation with its own "not signed in" redirect.
    onSuccess: () => window.location.assign("/sign-in"),
  });

  if (me.data === undefined) {
    return (
      <main className="mx-auto w-full max-w-console px-6 py-10">
        {me.error !== null && !unauthenticated ? (
          <Alert>{describeProblem(me.error)}</Alert>
        ) : (
          <p className="text-graphite-muted">Loading…</p>
        )}
      </main>
    );
  }

  const items = NAV_ITEMS.filter(
    (item) => (item.permission === undefined || allows(me.data, item.permission)) && (!item.devMailOnly || devMail),
  );

  return (
    <div className="flex flex-1 flex-col">
      <TopBar place={me.data.org.name} placeLabel="Organisation">
        <div className="ml-auto flex items-center gap-3 text-dense">
          <span className="text-graphite-soft">{me.data.user?.email}</span>
          {me.data.role !== undefined && <Badge>{me.data.role}</Badge>}
          <Button size="sm" variant="quiet" onClick={() => signOut.mutate(false)} disabled={signOut.isPending}>
            Sign out
          </Button>
        </div>
      </TopBar>
      <div className="mx-auto flex w-full max-w-console flex-1 gap-6 px-6 py-6">
        <nav aria-label="Console" className="w-40 shrink-0">
          <ul className="flex flex-col gap-0.5">
            {items.map((item) => {
              const current = item.href === "/" ? pathname === "/" : pathname.startsWith(item.href);
              return (
                <li key={item.href}>
                  <Link
                    href={item.href}
                    aria-current={current ? "page" : undefined}
                    className={`block rounded px-2.5 py-1.5 no-underline hover:no-underline ${
                      current ? "bg-lichen-wash font-medium text-lichen-night" : "text-graphite-soft hover:bg-paper-sunk"
                    }`}
                  >
                    {item.label}
                  </Link>
                </li>
              );
            })}
          </ul>
          <div className="mt-6 border-t border-paper-line pt-3">
            <Button
              size="sm"
              variant="quiet"
              onClick={() => signOut.mutate(true)}
              disabled={signOut.isPending}
              className="-ml-2"
            >
              Sign out everywhere
            </Button>
            {signOut.error !== null && <Alert>{describeProblem(signOut.error)}</Alert>}
          </div>
        </nav>
        <main className="min-w-0 flex-1">{children}</main>
      </div>
    </div>
  );
}
