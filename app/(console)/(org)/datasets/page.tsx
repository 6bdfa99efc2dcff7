import type { Metadata } from "next";
import { DatasetsPanel } from "./datasets-client";

export const metadata: Metadata = { title: "Datasets" };

export default function DatasetsPage() {
  return <DatasetsPanel />;
}
