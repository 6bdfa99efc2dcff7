// The wrappers every /api/v1 route handler goes through: request id, authentication (cookie session or
// `Authorization: Bearer` API key), the cross-site check for cookie-authenticated mutations, the permission
// check (decided here, in the handler, never only in middleware) and the one error mapper.
import "server-only";
import { randomUUID } from "node:crypto";
import type { z } from "zod";
import { db, type Db } from "@/db/client";
import type { ApiKeyRow, Organisation } from "@/db/schema";
import type { AuditInput } from "@/lib/audit/log";
import { ApiError, toProblem } from "@/lib/api/problem";
import { authenticateApiKey, displayPrefix } from "@/lib/auth/api-keys";
import { systemClock, type Clock } from "@/lib/auth/clock";
import {
  SCOPES, SCOPE_PERMISSIONS, can, permissionsOfRole, permissionsOfScopes, scopeCan,
  type Permission, type Scope,
} from "@/lib/auth/permissions";
import { readSession, sessionCookieName, type ActiveSession } from "@/lib/auth/sessions";
import { env } from "@/lib/env";

export type Principal =
  | ({ kind: "session"; permissions: Permission[] } & Omit<ActiveSession, "refreshedCookie">)
  | { kind: "api_key"; key: ApiKeyRow; org: Organisation; scopes: Scope[]; permissions: Permission[] };

export interface RequestContext {
  req: Request;
  requestId: string;
  ip: string | null;
  userAgent: string | null;
  db: Db;
  clock: Clock;
}

export interface AuthedContext<P> extends RequestContext {
  principal: Principal;
  params: P;
}

type RouteContext = { params: Promise<Record<string, string | string[]>> };
type RouteHandler = (req: Request, ctx: RouteContext) => Promise<Response>;

const MAX_JSON_BYTES = 64 * 1024;
const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * scripts/web-server.ts appends the socket's peer to X-Forwarded-For, so the last hop is always the real peer; each of
 * the RILLSCALE_TRUSTED_PROXIES proxies in front appended the hop before it. Hops further left are the client's word.
 */
function clientIp(req: Request): string | null {
  const hops = (req.headers.get("x-forwarded-for") ?? "").split(",").map((s) => s.trim()).filter(Boolean);
  return hops[hops.length - 1 - env().RILLSCALE_TRUSTED_PROXIES] ?? null;
}

function requestContext(req: Request): RequestContext {
  const incoming = req.headers.get("x-request-id");
  return {
    req,
    requestId: incoming && /^[\w.-]{8,100}$/.test(incoming) ? incoming : randomUUID(),
    ip: clientIp(req),
    userAgent: req.headers.get("user-agent"),
    db: db(),
    clock: systemClock,
  };
}

/** Browsers send Sec-Fetch-Site and Origin; a request that is not same-origin may not use the cookie to change anything. */
function assertSameSite(req: Request) {
  if (SAFE_METHODS.has(req.method)) return;
  const site = req.headers.get("sec-fetch-site");
  if (site && site !== "same-origin" && site !== "none") throw new ApiError("cross-site", `Sec-Fetch-Site is ${site}`);
  const origin = req.headers.get("origin");
  if (origin) {
    const allowed = new Set([new URL(req.url).origin, new URL(env().RILLSCALE_PUBLIC_URL).origin]);
    if (!allowed.has(origin)) throw new ApiError("cross-site", `Origin ${origin} is not this site`);
  }
}

function readCookie(req: Request, name: string): string | null {
  for (const part of (req.headers.get("cookie") ?? "").split(";")) {
    const eqAt = part.indexOf("=");
    if (eqAt > 0 && part.slice(0, eqAt).trim() === name) return part.slice(eqAt + 1).trim();
  }
  return null;
}

const bearerChallenge = (extra = "") => ({ "www-authenticate": `Bearer realm="rillscale"${extra}` });

async function authenticate(rc: RequestContext): Promise<{ principal: Principal; refreshedCookie: string | null }> {
  const authorization = rc.req.headers.get("authorization");
  if (authorization !== null) {
    const m = /^Bearer\s+(\S+)$/i.exec(authorization);
    const check = m ? await authenticateApiKey(rc.db, env().RILLSCALE_KEY_PEPPER, m[1], rc.clock) : null;
    if (!check?.ok) {
      throw new ApiError("unauthenticated", "The API key is missing, malformed, unknown, expired or revoked.", {
        headers: bearerChallenge(', error="invalid_token"'),
      });
    }
    const scopes = check.key.scopes.filter((s): s is Scope => (SCOPES as readonly string[]).includes(s));
    return { principal: { kind: "api_key", key: check.key, org: check.org, scopes, permissions: permissionsOfScopes(scopes) }, refreshedCookie: null };
  }
  const jwt = readCookie(rc.req, sessionCookieName());
  const active = jwt ? await readSession(rc.db, jwt, rc.clock) : null;
  if (!active) throw new ApiError("unauthenticated", "Sign in, or send an API key as `Authorization: Bearer <key>`.", { headers: bearerChallenge() });
  const { refreshedCookie, ...rest } = active;
  return { principal: { kind: "session", ...rest, permissions: permissionsOfRole(rest.role) }, refreshedCookie };
}

function authorize(p: Principal, permission: Permission) {
  if (p.kind === "session") {
    if (!can(p.role, permission)) throw new ApiError("forbidden", `The ${p.role} role may not do this (needs ${permission}).`);
    return;
  }
  if (!scopeCan(p.scopes, permission)) {
    const needed = SCOPES.filter((s) => SCOPE_PERMISSIONS[s].includes(permission));
    throw new ApiError("insufficient-scope", `This needs one of the scopes: ${needed.join(", ")}.`, {
      headers: bearerChallenge(`, error="insufficient_scope", scope="${needed.join(" ")}"`),
    });
  }
}

export function actorOf(p: Principal): AuditInput["actor"] {
  return p.kind === "session"
    ? { kind: "user", id: p.user.id, label: p.user.email }
    : { kind: "api_key", id: p.key.id, label: `${displayPrefix(p.key.id)} (${p.key.name})` };
}

/** Who acts, for services that audit: the organisation, the audit actor, the user (null for a key), the address. */
export function actingOf(p: Principal, ip: string | null) {
  return { orgId: p.org.id, actor: actorOf(p), userId: p.kind === "session" ? p.user.id : null, ip };
}

function finish(res: Response, requestId: string, cookie?: string | null): Response {
  res.headers.set("x-request-id", requestId);
  if (!res.headers.has("cache-control")) res.headers.set("cache-control", "no-store");
  if (cookie) res.headers.append("set-cookie", cookie);
  return res;
}

export interface AuthOptions {
  permission?: Permission;
  /** Routes about the browser session itself (sign-out) refuse API keys. */
  sessionOnly?: boolean;
}

export function withAuth<P = Record<string, string>>(handler: (c: AuthedContext<P>) => Promise<Response>, opts: AuthOptions = {}): RouteHandler {
  return async (req, ctx) => {
    const rc = requestContext(req);
    try {
      if (!req.headers.has("authorization")) assertSameSite(req);
      const { principal, refreshedCookie } = await authenticate(rc);
      if (opts.sessionOnly && principal.kind !== "session") {
        throw new ApiError("forbidden", "This acts on a browser session; API keys are revoked with POST /api/v1/keys/{id}/revoke.");
      }
      if (opts.permission) authorize(principal, opts.permission);
      const params = (await ctx.params) as P;
      return finish(await handler({ ...rc, principal, params }), rc.requestId, refreshedCookie);
    } catch (e) {
      return finish(toProblem(e, rc.requestId), rc.requestId);
    }
  };
}

/** Routes anyone may call (sign-in, reset, health); mutations still refuse cross-site browsers. */
export function withPublic(handler: (c: RequestContext) => Promise<Response>): RouteHandler {
  return async (req) => {
    const rc = requestContext(req);
    try {
      assertSameSite(req);
      return finish(await handler(rc), rc.requestId);
    } catch (e) {
      return finish(toProblem(e, rc.requestId), rc.requestId);
    }
  };
}

export async function parseJson<S extends z.ZodType>(req: Request, schema: S): Promise<z.infer<S>> {
  const tooLarge = () => new ApiError("payload-too-large", `JSON bodies are limited to ${MAX_JSON_BYTES} bytes.`);
  if (Number(req.headers.get("content-length") ?? 0) > MAX_JSON_BYTES) throw tooLarge();
  // A chunked body has no declared length: count bytes as they arrive and stop reading at the cap.
  const chunks: Uint8Array[] = [];
  let bytes = 0;
  if (req.body) {
    const reader = req.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      bytes += value.byteLength;
      if (bytes > MAX_JSON_BYTES) {
        await reader.cancel().catch(() => {});
        throw tooLarge();
      }
      chunks.push(value);
    }
  }
  const text = Buffer.concat(chunks).toString("utf8");
  const type = req.headers.get("content-type") ?? "";
  if (text.length > 0 && !/^application\/([\w.+-]*\+)?json\b/i.test(type)) throw new ApiError("unsupported-media-type", "Send the body as application/json.");
  let value: unknown = {};
  if (text.length > 0) {
    try {
      value = JSON.parse(text);
    } catch {
      throw new ApiError("bad-request", "The body is not valid JSON.");
    }
  }
  return schema.parse(value);
}

export function parseQuery<S extends z.ZodType>(req: Request, schema: S): z.infer<S> {
  return schema.parse(Object.fromEntries(new URL(req.url).searchParams));
}

export const json = (body: unknown, status = 200, headers: Record<string, string> = {}) =>
  new Response(JSON.stringify(body), { status, headers: { "content-type": "application/json", ...headers } });

export const noContent = (headers: Record<string, string> = {}) => new Response(null, { status: 204, headers });
