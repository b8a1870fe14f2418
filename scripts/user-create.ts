// Creates (or re-roles) a member directly in the database, outside demo mode:
//   npm run user:create -- <email> <viewer|reviewer|analyst|admin> [display name]
// The password comes from ISTHMUS_NEW_PASSWORD or is asked for on the terminal.
// Run the server once first so the tables exist.
import { createInterface } from 'node:readline/promises'
import { createClient } from '@libsql/client'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import { ROLES, type Role } from '#shared/types/roles'
import { useConfig } from '../server/utils/config'

const [emailArg, role = 'admin', ...nameParts] = process.argv.slice(2)
if (!emailArg || !ROLES.includes(role as Role)) {
  console.error(`usage: npm run user:create -- <email> <${ROLES.join('|')}> [display name]`)
  process.exit(2)
}
const email = emailArg.trim().toLowerCase()
// A one-off input of this command, not a server setting, so it stays out of useConfig().
let password = process.env.ISTHMUS_NEW_PASSWORD
if (!password) {
  const rl = createInterface({ input: process.stdin, output: process.stdout })
  password = await rl.question('Password (10+ characters): ')
  rl.close()
}
if (password.length < 10) {
  console.error('The password needs at least 10 characters')
  process.exit(2)
}
// The same scrypt hasher and defaults as nuxt-auth-utils' hashPassword, so the server verifies it.
const hash = await new Hash(new Scrypt({})).make(password)
const db = createClient({ url: useConfig().databaseUrl, authToken: useConfig().databaseAuthToken })
const found = await db.execute({ sql: 'select id from users where email = ?', args: [email] })
if (found.rows.length) {
  await db.execute({ sql: 'update users set role = ?, password_hash = ?, active = 1 where email = ?', args: [role, hash, email] })
  console.info(`Updated ${email} (${role}).`)
}
else {
  await db.execute({ sql: 'insert into users (email, name, role, password_hash) values (?, ?, ?, ?)', args: [email, nameParts.join(' ') || email.split('@')[0]!, role, hash] })
  console.info(`Created ${email} (${role}).`)
}
db.close()
