import { sql, type SQL, type SQLWrapper } from 'drizzle-orm'

/**
 * `column LIKE '%text%' ESCAPE '\'` matching `text` literally: `%`, `_` and the backslash itself are
 * escaped, and the ESCAPE clause tells SQLite which character escapes (it has no default one).
 * SQLite's LIKE ignores case for ASCII letters.
 */
export function containsText(column: SQLWrapper, text: string): SQL {
  const pattern = `%${text.replace(/[\\%_]/g, m => `\\${m}`)}%`
  return sql`${column} like ${pattern} escape '\\'`
}
