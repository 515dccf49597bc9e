import { defineConfig } from 'drizzle-kit';

// Migrations are generated here and applied by the server itself at start (openDatabase in server/db/client.ts).
export default defineConfig({
  dialect: 'postgresql',
  schema: './server/db/schema/index.ts',
  out: './server/db/migrations',
});
