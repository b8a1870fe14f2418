import { defineConfig } from 'drizzle-kit'
import { useConfig } from './server/utils/config'

export default defineConfig({
  dialect: 'sqlite',
  schema: './server/db/schema.ts',
  out: './server/db/migrations',
  dbCredentials: { url: useConfig().databaseUrl },
})
