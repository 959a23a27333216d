// For the knex CLI (see DEVELOPERS.md); the app itself migrates on start-up.
import { loadConfig } from '../config'
import { migrationsDir, seedsDir } from './knex'

const config = loadConfig()

export default {
  client: 'better-sqlite3',
  connection: { filename: config.databaseFile },
  useNullAsDefault: true,
  migrations: { directory: migrationsDir, extension: 'ts', loadExtensions: ['.ts'] },
  seeds: { directory: seedsDir, extension: 'ts', loadExtensions: ['.ts'] },
}
