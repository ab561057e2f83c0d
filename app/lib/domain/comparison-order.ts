/**
 * Which drive log a comparison is measured against, and which pairs /comparisons suggests.
 * Pure; the rule is in README "Comparison" and docs/comparisons.md.
 *
 * The reference is the same however a comparison is opened (ticked on the vehicle page, "Compare
 * with…" on a drive log, a suggested pair, a bookmarked address or a share link): the order of
 * the ids in `?logs=` never matters (issue 11 §3.2).
 * - If exactly one drive log has the damper variant the vehicle is fitted with (its baseline),
 *   that one is the reference: "before" is the production damper.
 * - Otherwise the one tested first: the earliest test date, a drive log without one counting by
 *   the day it was uploaded; then the earlier upload; then the lower id.
 * The other drive logs follow in that date order.
 */

export interface ReferenceCandidate {
  id: number;
  damperVariant: string;
  /** YYYY-MM-DD, as stored. */
  testDate: string | null;
  uploadedAt: Date;
}

/** Why the first drive log is the reference. */
export type ReferenceReason = "fitted-damper" | "tested-first";

/** The day a drive log counts as tested: its test date, else its upload day (UTC). */
export function testedOn(log: Pick<ReferenceCandidate, "testDate" | "uploadedAt">): string {
  return log.testDate ?? log.uploadedAt.toISOString().slice(0, 10);
}

/** Earliest tested first; then earlier upload; then lower id. */
export function byTestedFirst(a: ReferenceCandidate, b: ReferenceCandidate): number {
  const day = testedOn(a).localeCompare(testedOn(b));
  if (day !== 0) return day;
  const upload = a.uploadedAt.getTime() - b.uploadedAt.getTime();
  return upload !== 0 ? upload : a.id - b.id;
}

/** The drive logs with the reference first, and why it is the reference (null when none). */
export function comparisonOrder<T extends ReferenceCandidate>(
  logs: readonly T[],
  fittedVariant: string,
): { ordered: T[]; reason: ReferenceReason | null } {
  const dated = [...logs].sort(byTestedFirst);
  const fitted = dated.filter((l) => l.damperVariant === fittedVariant);
  if (fitted.length === 1 && dated.length >= 2)
    return {
      ordered: [fitted[0]!, ...dated.filter((l) => l !== fitted[0])],
      reason: "fitted-damper",
    };
  return { ordered: dated, reason: dated.length ? "tested-first" : null };
}

export interface SuggestionCandidate extends ReferenceCandidate {
  condition: string;
  gear: number | null;
  /** The stored file (sha256): the same file uploaded again has the same key. */
  blobKey: string;
  analysed: boolean;
}

export interface SuggestedPair<T> {
  condition: T extends { condition: infer C } ? C : never;
  gear: number | null;
  /** Two drive logs, the reference first. */
  logs: [T, T];
}

/**
 * Every pair of damper variants with analysed drive logs of the same condition and gear, each
 * as one drive log per variant, reference first (issue 11 §3.3). Stable: a file uploaded again
 * is not a candidate of its own (the first upload stands for it), and each variant is
 * represented by its drive log with the latest test date (logs without a test date only when
 * the variant has no dated one; then the latest upload). `conditions` gives the listing order.
 */
export function suggestedPairs<T extends SuggestionCandidate>(
  logs: readonly T[],
  fittedVariant: string,
  conditions: readonly string[],
): SuggestedPair<T>[] {
  const firstOfFile = new Map<string, T>();
  for (const l of [...logs].filter((x) => x.analysed).sort((a, b) => a.id - b.id))
    if (!firstOfFile.has(l.blobKey)) firstOfFile.set(l.blobKey, l);

  const groups = new Map<string, Map<string, T>>();
  for (const l of firstOfFile.values()) {
    const key = `${l.condition}|${l.gear ?? ""}`;
    const variants = groups.get(key) ?? new Map<string, T>();
    const held = variants.get(l.damperVariant);
    if (!held || representsBetter(l, held)) variants.set(l.damperVariant, l);
    groups.set(key, variants);
  }

  const pairs: SuggestedPair<T>[] = [];
  for (const variants of groups.values()) {
    const names = [...variants.keys()].sort((a, b) => a.localeCompare(b));
    for (let i = 0; i < names.length; i++)
      for (let j = i + 1; j < names.length; j++) {
        const { ordered } = comparisonOrder(
          [variants.get(names[i]!)!, variants.get(names[j]!)!],
          fittedVariant,
        );
        pairs.push({
          condition: ordered[0]!.condition as SuggestedPair<T>["condition"],
          gear: ordered[0]!.gear,
          logs: [ordered[0]!, ordered[1]!],
        });
      }
  }
  const rank = (c: string) => conditions.indexOf(c);
  return pairs.sort(
    (a, b) =>
      rank(a.condition) - rank(b.condition) ||
      (a.gear ?? -1) - (b.gear ?? -1) ||
      variantKey(a).localeCompare(variantKey(b)),
  );
}

/** Dated beats undated; then the later test date; then the later upload; then the lower id. */
function representsBetter(a: SuggestionCandidate, b: SuggestionCandidate): boolean {
  if ((a.testDate === null) !== (b.testDate === null)) return a.testDate !== null;
  if (a.testDate && b.testDate && a.testDate !== b.testDate) return a.testDate > b.testDate;
  if (a.testDate === null && a.uploadedAt.getTime() !== b.uploadedAt.getTime())
    return a.uploadedAt > b.uploadedAt;
  return a.id < b.id;
}

function variantKey(p: SuggestedPair<SuggestionCandidate>): string {
  return p.logs
    .map((l) => l.damperVariant)
    .sort((a, b) => a.localeCompare(b))
    .join("|");
}

/** The rule in one sentence, shown under every comparison. */
export const REFERENCE_RULE =
  "However the comparison is opened, the reference is the drive log with the vehicle's fitted damper variant when exactly one has it, otherwise the one tested first (by test date, else by upload day).";

/** Why this comparison's reference is the one it is, in one sentence. */
export function referenceSentence(
  ref: { name: string } & Pick<ReferenceCandidate, "testDate" | "uploadedAt">,
  reason: ReferenceReason,
  fittedVariant: string,
): string {
  if (reason === "fitted-damper")
    return `Reference: ${ref.name}, the only drive log here with the vehicle's fitted damper variant (${fittedVariant}).`;
  const day = testedOn(ref);
  const when = ref.testDate ? `test date ${day}` : `no test date, uploaded ${day}`;
  return `Reference: ${ref.name}, the one tested first${ref.name.includes(day) ? "" : ` (${when})`}.`;
}
