// Console sessions: a short JWT (jose, HS256) in an HttpOnly SameSite=Lax cookie, backed by a sessions row so
// sign-out and "sign out everywhere" take effect at once. The JWT is re-issued while the row lives.
import { and, eq, gt, isNull } from "drizzle-orm";
import { SignJWT, jwtVerify } from "jose";
import type { Db } from "@/db/client";
import { memberships, organisations, sessions, users, type Organisation, type Session, type User } from "@/db/schema";
import type { Clock } from "@/lib/auth/clock";
import type { Role } from "@/lib/auth/permissions";
import { env, isHttpsDeployment } from "@/lib/env";

export const SESSION_JWT_TTL_S = 30 * 60;
// Re-issue when less than this is left, so an active console never sees its token expire.
export const SESSION_REFRESH_BELOW_S = 15 * 60;
export const SESSION_ROW_TTL_MS = 12 * 3_600_000;
const ISSUER = "rillscale";

/** `__Host-` needs Secure, which needs HTTPS; a plain-HTTP local start uses the unprefixed name. */
export function sessionCookieName(): string {
  return isHttpsDeployment() ? "__Host-rillscale_session" : "rillscale_session";
}

const key = () => new TextEncoder().encode(env().RILLSCALE_SESSION_SECRET);

async function signSessionJwt(s: Pick<Session, "id" | "userId" | "orgId" | "expiresAt">, clock: Clock): Promise<{ jwt: string; maxAge: number }> {
  const nowS = Math.floor(clock.now().getTime() / 1000);
  const exp = Math.min(nowS + SESSION_JWT_TTL_S, Math.floor(s.expiresAt.getTime() / 1000));
  const jwt = await new SignJWT({ org: s.orgId })
    .setProtectedHeader({ alg: "HS256" })
    .setIssuer(ISSUER)
    .setSubject(s.userId)
    .setJti(s.id)
    .setIssuedAt(nowS)
    .setExpirationTime(exp)
    .sign(key());
  return { jwt, maxAge: exp - nowS };
}

export function sessionCookieHeader(jwt: string, maxAge: number): string {
  const secure = isHttpsDeployment() ? "; Secure" : "";
  return `${sessionCookieName()}=${jwt}; Path=/; HttpOnly; SameSite=Lax; Max-Age=${maxAge}${secure}`;
}

export function clearedSessionCookieHeader(): string {
  const secure = isHttpsDeployment() ? "; Secure" : "";
  return `${sessionCookieName()}=; Path=/; HttpOnly; SameSite=Lax; Max-Age=0${secure}`;
}

export async function issueSession(
  db: Db, o: { userId: string; orgId: string; ip: string | null; userAgent: string | null }, clock: Clock,
): Promise<{ session: Session; cookie: string }> {
  const now = clock.now();
  const [session] = await db
    .insert(sessions)
    .values({ userId: o.userId, orgId: o.orgId, createdAt: now, expiresAt: new Date(now.getTime() + SESSION_ROW_TTL_MS), ip: o.ip, userAgent: o.userAgent })
    .returning();
  const { jwt, maxAge } = await signSessionJwt(session, clock);
  return { session, cookie: sessionCookieHeader(jwt, maxAge) };
}

export interface ActiveSession {
  session: Session;
  user: User;
  org: Organisation;
  role: Role;
  /** A fresh Set-Cookie value when the presented JWT is close to expiry. */
  refreshedCookie: string | null;
}

export async function readSession(db: Db, jwt: string, clock: Clock): Promise<ActiveSession | null> {
  let claims;
  try {
    ({ payload: claims } = await jwtVerify(jwt, key(), { issuer: ISSUER, algorithms: ["HS256"], currentDate: clock.now() }));
  } catch {
    return null;
  }
  if (!claims.jti || !claims.sub) return null;
  const now = clock.now();
  const [row] = await db
    .select({ session: sessions, user: users, org: organisations, role: memberships.role })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .innerJoin(organisations, eq(organisations.id, sessions.orgId))
    .innerJoin(memberships, and(eq(memberships.orgId, sessions.orgId), eq(memberships.userId, sessions.userId)))
    .where(and(eq(sessions.id, claims.jti), eq(sessions.userId, claims.sub), isNull(sessions.revokedAt), gt(sessions.expiresAt, now)));
  if (!row) return null;
  let refreshedCookie: string | null = null;
  if ((claims.exp ?? 0) - now.getTime() / 1000 < SESSION_REFRESH_BELOW_S) {
    const { jwt: fresh, maxAge } = await signSessionJwt(row.session, clock);
    if (maxAge > 0) refreshedCookie = sessionCookieHeader(fresh, maxAge);
  }
  return { ...row, refreshedCookie };
}

export async function revokeSession(db: Db, sessionId: string, clock: Clock) {
  await db.update(sessions).set({ revokedAt: clock.now() }).where(and(eq(sessions.id, sessionId), isNull(sessions.revokedAt)));
}

/** Every live session of a user (in one organisation when given). */
export async function revokeUserSessions(db: Db, userId: string, clock: Clock, orgId?: string) {
  const conds = [eq(sessions.userId, userId), isNull(sessions.revokedAt)];
  if (orgId) conds.push(eq(sessions.orgId, orgId));
  await db.update(sessions).set({ revokedAt: clock.now() }).where(and(...conds));
}
