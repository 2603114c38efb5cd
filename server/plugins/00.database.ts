// Data routes answer 503 (not 500) while the database is unreachable; see server/utils/unavailable.ts.
import { usePool } from '../utils/db'
import { answer503WhenDatabaseIsDown } from '../utils/unavailable'

export default defineNitroPlugin(() => {
  if (process.env.DATABASE_URL) answer503WhenDatabaseIsDown(usePool())
})
