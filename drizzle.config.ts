import { defineConfig } from "drizzle-kit";

// Migrations are generated offline (`npm run db:generate`) and applied by db/migrate.ts as the owner role.
export default defineConfig({
  dialect: "postgresql",
  schema: "./db/schema.ts",
  out: process.env.DRIZZLE_OUT ?? "./drizzle",
  casing: "snake_case",
});
