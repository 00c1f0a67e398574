// drizzle-kit configuration: `npx drizzle-kit generate` writes SQL migrations into drizzle/ (no database needed).
import { defineConfig } from 'drizzle-kit';

export default defineConfig({
  dialect: 'sqlite',
  schema: './server/db/schema.ts',
  out: './drizzle',
});
