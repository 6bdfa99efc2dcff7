// How the dataset/job, feature-service and provenance groups of operations enter the OpenAPI document: one
// operation shape, problem+json error answers worded per group, and each group's extra headers.
import type { OpenAPIRegistry, RouteConfig } from "@asteasolutions/zod-to-openapi";
import type { z } from "zod";

type Header = { description: string; schema: { type: "string" } };

export interface DocumentedOperation {
  method: RouteConfig["method"];
  path: string;
  summary: string;
  description?: string;
  permission: string;
  params?: z.ZodObject;
  query?: z.ZodObject;
  headers?: z.ZodObject;
  /** The request body as OpenAPI wants it (required flag and content by media type). */
  body?: RouteConfig["request"] extends infer R ? R extends { body?: infer B } ? B : never : never;
  ok: { status: number; description: string; content?: Record<string, { schema: unknown }>; headers?: Record<string, Header> };
  errors: number[];
}

export interface OperationGroup {
  /** What each error status means for these routes. */
  errorText: Record<number, string>;
  tags?: string[];
  /** Headers every success answer of the group carries. */
  okHeaders?: Record<string, Header>;
  /** Headers of particular error answers (e.g. Retry-After on 429). */
  errorHeaders?: Record<number, Record<string, Header>>;
}

export const stringHeader = (description: string): Header => ({ description, schema: { type: "string" } });
export const jsonContent = (schema: unknown) => ({ "application/json": { schema } });

export function registerOperations(registry: OpenAPIRegistry, problem: z.ZodType, group: OperationGroup, operations: DocumentedOperation[]): void {
  for (const op of operations) {
    const okHeaders = group.okHeaders || op.ok.headers ? { headers: { ...group.okHeaders, ...op.ok.headers } } : {};
    const responses: RouteConfig["responses"] = {
      [op.ok.status]: { description: op.ok.description, ...(op.ok.content ? { content: op.ok.content as never } : {}), ...okHeaders },
    };
    for (const status of op.errors) {
      const headers = group.errorHeaders?.[status];
      responses[status] = {
        description: group.errorText[status],
        content: { "application/problem+json": { schema: problem } },
        ...(headers ? { headers } : {}),
      };
    }
    registry.registerPath({
      method: op.method, path: op.path, summary: op.summary, description: op.description,
      ...(group.tags ? { tags: group.tags } : {}),
      security: [{ session: [] }, { apiKey: [] }], "x-permission": op.permission,
      request: {
        ...(op.params ? { params: op.params } : {}), ...(op.query ? { query: op.query } : {}),
        ...(op.body ? { body: op.body } : {}), ...(op.headers ? { headers: op.headers } : {}),
      },
      responses,
    });
  }
}
