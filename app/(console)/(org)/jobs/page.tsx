import type { Metadata } from "next";
import { kindCatalog } from "@/components/jobs/kind-catalog";
import { JobsPanel } from "./jobs-client";

export const metadata: Metadata = { title: "Jobs" };

const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

// The kinds and their parameters are read here, on the server, from the pipelines' schemas.
export default async function JobsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const query = await searchParams;
  return <JobsPanel catalog={kindCatalog()} initialDataset={first(query.dataset)} initialStatus={first(query.status)} />;
}
