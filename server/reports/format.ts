/** File names of the printed reports. (Numbers and units use shared/format.ts, as the result page does.) */

/**
 * A safe piece of a file name: ASCII letters, digits and hyphens, lower case, accents dropped.
 * @example fileSlug('Group A1') // 'group-a1'
 * @example fileSlug('Dvořák, Anežka') // 'dvorak-anezka'
 */
export function fileSlug(text: string, fallback = 'report'): string {
  const slug = text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60)
    .replace(/-+$/, '')
  return slug || fallback
}
