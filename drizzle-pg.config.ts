// drizzle-kit configuration for PostgreSQL: `npm run db:generate:pg` writes SQL migrations into
// drizzle-pg/ (no database needed). The SQLite ones come from drizzle.config.ts.
import { defineConfig } from 'drizzle-kit';

export default defineConfig({
  dialect: 'postgresql',
  schema: './server/db/schema-pg.ts',
  out: './drizzle-pg',
});
