/**
 * Test details a file's own metadata offers: the date and comment a recorder wrote into a CSV
 * preamble or an MDF4 header, so the upload and the drive-log page can offer them as the drive
 * log's test date and notes. Only offered, never applied silently.
 *
 * Date keys (ignoring case, `_` and `-`): any key containing "date", and "recorded",
 * "recorded at", "start", "start time", "created", "timestamp". Date forms: ISO 8601
 * (2026-12-02, with or without a time), 2026/12/02, 02.12.2026, 2.12.2026, and English month
 * names (2 Dec 2026, December 2, 2026). A slash with the year last (12/02/2026) is read only
 * when the day is plain (over 12), since both day-first and month-first are in use.
 * Comment keys: comment(s), description, note(s), remark(s); several are joined by line breaks.
 */
import type { SourceMetadataEntry } from "./types.ts";

export interface MetadataDetails {
  /** The recording date as YYYY-MM-DD, when a date key holds a readable date. */
  date?: string;
  /** A comment, description or note the recorder kept. */
  comment?: string;
}

const COMMENT_KEYS = new Set([
  "comment",
  "comments",
  "description",
  "note",
  "notes",
  "remark",
  "remarks",
]);
const DATE_KEYS = new Set([
  "recorded",
  "recorded at",
  "start",
  "start time",
  "created",
  "timestamp",
]);
const MONTHS = ["jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec"];
/** A comment longer than this is cut: it is offered as a drive log's notes. */
const MAX_COMMENT = 1000;

const normKey = (k: string) => k.toLowerCase().replace(/[_-]+/g, " ").replace(/\s+/g, " ").trim();

function ymd(y: number, m: number, d: number): string | undefined {
  if (y < 1900 || y > 2999 || m < 1 || m > 12 || d < 1) return undefined;
  const days = new Date(Date.UTC(y, m, 0)).getUTCDate(); // day 0 of the next month
  if (d > days) return undefined;
  return `${y}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
}

const monthOf = (name: string) => MONTHS.indexOf(name.slice(0, 3).toLowerCase()) + 1;

/** A date in one of the forms above → YYYY-MM-DD, else undefined. */
export function parseRecordingDate(text: string): string | undefined {
  const t = text.trim();
  let m = /^(\d{4})[-/](\d{1,2})[-/](\d{1,2})(?:$|[T\s])/.exec(t);
  if (m) return ymd(Number(m[1]), Number(m[2]), Number(m[3]));
  m = /^(\d{1,2})\.(\d{1,2})\.(\d{4})(?:$|\s)/.exec(t);
  if (m) return ymd(Number(m[3]), Number(m[2]), Number(m[1]));
  m = /^(\d{1,2})\/(\d{1,2})\/(\d{4})(?:$|\s)/.exec(t);
  if (m) {
    const [a, b] = [Number(m[1]), Number(m[2])];
    if (a > 12) return ymd(Number(m[3]), b, a);
    if (b > 12) return ymd(Number(m[3]), a, b);
    return undefined; // 03/04/2026: day-first or month-first, cannot be told
  }
  m = /^(\d{1,2})\.?\s+([a-z]{3,9})\.?,?\s+(\d{4})(?:$|\s)/i.exec(t);
  if (m && monthOf(m[2] ?? "") > 0) return ymd(Number(m[3]), monthOf(m[2] ?? ""), Number(m[1]));
  m = /^([a-z]{3,9})\.?\s+(\d{1,2}),?\s+(\d{4})(?:$|\s)/i.exec(t);
  if (m && monthOf(m[1] ?? "") > 0) return ymd(Number(m[3]), monthOf(m[1] ?? ""), Number(m[2]));
  return undefined;
}

/** The date and comment the metadata offers (each absent when none is readable). */
export function metadataDetails(metadata: readonly SourceMetadataEntry[]): MetadataDetails {
  const out: MetadataDetails = {};
  const comments: string[] = [];
  for (const { key, value } of metadata) {
    const k = normKey(key);
    if (out.date === undefined && (k.includes("date") || DATE_KEYS.has(k))) {
      const date = parseRecordingDate(value);
      if (date) out.date = date;
    }
    if (COMMENT_KEYS.has(k) && value.trim() !== "") comments.push(value.trim());
  }
  const comment = comments.join("\n");
  if (comment !== "") out.comment = comment.slice(0, MAX_COMMENT);
  return out;
}
