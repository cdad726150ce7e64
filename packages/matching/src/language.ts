/**
 * Language matching on BCP 47 tags (RFC 5646): a request is met by any tag with the same primary
 * language subtag, compared case-insensitively (`de` ~ `de-DE` ~ `DE-at`). Regional variants are
 * mutually understood well enough for supervising cases (common practice), so the region and
 * script subtags are not compared.
 */

/**
 * Checks a BCP 47 tag (through `Intl.getCanonicalLocales`) and returns its primary language
 * subtag in lower case: `pt-BR` → `pt`.
 * @throws RangeError for a malformed tag.
 */
export function primaryLanguage(tag: string): string {
  if (typeof tag !== 'string') throw new RangeError(`Not a BCP 47 language tag: ${String(tag)}`);
  const [canonical = ''] = Intl.getCanonicalLocales(tag);
  return (canonical.split('-')[0] ?? '').toLowerCase();
}

/**
 * The first of `languages` that meets the `requested` language (same primary subtag), or
 * `undefined` when none does.
 * @throws RangeError for a malformed tag.
 */
export function matchingLanguage(
  languages: readonly string[],
  requested: string,
): string | undefined {
  const wanted = primaryLanguage(requested);
  return languages.find((tag) => primaryLanguage(tag) === wanted);
}
