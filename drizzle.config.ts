import { defineConfig } from 'drizzle-kit';

// Only `npm run db:generate` uses this file: it diffs the schema against drizzle/ and writes a new
// migration. Migrations are applied by scripts/db.js with drizzle-orm's migrator.
export default defineConfig({
	dialect: 'mysql',
	schema: './src/lib/server/db/schema/index.ts',
	out: './drizzle',
	casing: 'snake_case'
});
