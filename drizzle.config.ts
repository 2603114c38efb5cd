// drizzle-kit reads this to generate SQL migrations from server/db/schema.ts into drizzle/.
// Generation needs no database; migrations are applied by scripts/postgres.ts with the programmatic migrator.
import { defineConfig } from 'drizzle-kit'

export default defineConfig({
  dialect: 'postgresql',
  schema: './server/db/schema.ts',
  out: './drizzle',
})
