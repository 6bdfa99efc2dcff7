// GET /api/v1/dev/mail — mail caught by the local SMTP catcher (development and tests only, admins only)
import { json, withAuth } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { devMailEnabled, env } from "@/lib/env";
import { readCaughtMail } from "@/lib/mail/store";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async () => {
  const dir = env().RILLSCALE_MAIL_DIR;
  if (!devMailEnabled() || !dir) throw new ApiError("not-found", "The development mail box is off.");
  return json({ items: readCaughtMail(dir) });
}, { permission: "mail:read-dev" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
