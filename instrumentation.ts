// Next.js boot hook: validate the environment once, before the first request, so a bad setting stops the server.
export async function register() {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { env } = await import("@/lib/env");
    env();
  }
}
