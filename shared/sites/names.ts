/**
 * Names the planning page gives a site by itself: "Best ground 2 (25.687, 32.640)" from the
 * best-ground search and "Site 7" from a click on the map. A trip that uses such a site cannot be
 * published until someone gives it a real name.
 */
const AUTOMATIC_NAMES = [/^Best ground \d+\b/i, /^Site \d+$/i]

export function isAutomaticSiteName(name: string): boolean {
  const n = name.trim()
  return AUTOMATIC_NAMES.some((re) => re.test(n))
}
