// Counts in words, one way everywhere: "1 drive log", "3 drive logs", "0 drive logs".
// Intl.PluralRules picks the form (CLDR plural rules for English: "one" for 1, "other" else).
const rules = new Intl.PluralRules("en");

/** The noun in the form a count of `n` needs; `other` defaults to `one` + "s". */
export function plural(n: number, one: string, other = `${one}s`): string {
  return rules.select(n) === "one" ? one : other;
}

/** The count and its noun: countText(1, "engine speed") → "1 engine speed". */
export function countText(n: number, one: string, other = `${one}s`): string {
  return `${n} ${plural(n, one, other)}`;
}
