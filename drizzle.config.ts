import { defineConfig } from 'drizzle-kit';

// `npx drizzle-kit generate` writes a migration for every change of the schema files into drizzle/;
// the server applies them at start (server/db/migrate.ts). Generating needs no database.
export default defineConfig({
  dialect: 'postgresql',
  schema: './server/db/schema/*.ts',
  out: './drizzle',
  dbCredentials: { url: process.env.DATABASE_URL ?? 'postgres://localhost/proofline' },
});
