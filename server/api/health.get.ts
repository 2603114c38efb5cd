// Liveness for people and scripts: the app version and whether the database answers.
import { version } from '~~/package.json'

export default defineApiHandler(async () => ({
  version,
  database: (await databaseAnswers()) ? 'ok' : 'down',
}))
