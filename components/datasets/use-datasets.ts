"use client";

import { useInfiniteQuery, useQuery } from "@tanstack/react-query";
import { api } from "@/components/data/api";
import type { DatasetBody, Page } from "@/components/jobs/bodies";

/** Every dataset query starts with this key, so an upload or a delete refreshes them all. */
export const DATASETS_QUERY_KEY = ["datasets"] as const;
/** The most the list route returns in one page. */
const PAGE_MAX = 200;

/** The datasets table: newest first, a page at a time. */
export function useDatasetPages(pageSize = 50) {
  return useInfiniteQuery({
    queryKey: [...DATASETS_QUERY_KEY, "pages", pageSize],
    queryFn: ({ pageParam }) =>
      api<Page<DatasetBody>>(`/datasets?limit=${pageSize}${pageParam === null ? "" : `&cursor=${encodeURIComponent(pageParam)}`}`),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
  });
}

/** The newest datasets for pickers and for naming a job's dataset; older ones are shown by id. */
export function useRecentDatasets() {
  return useQuery({
    queryKey: [...DATASETS_QUERY_KEY, "recent"],
    queryFn: () => api<Page<DatasetBody>>(`/datasets?limit=${PAGE_MAX}`),
  });
}
