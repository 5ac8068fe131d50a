/**
 * SQL texts sent often enough to be prepared once per PostgreSQL connection (compiledOnce registers
 * its statements): the pool's clients send such a text by name, so the server parses and plans it once
 * per connection instead of on every call. Any other text goes as before.
 */
const names = new Map<string, string>()

export function prepareText(sql: string): void {
  if (!names.has(sql)) names.set(sql, `umbrafield_${names.size + 1}`)
}

export function preparedName(sql: string): string | undefined {
  return names.get(sql)
}
