/**
 * Test details a file's own metadata offers (STUB until the preamble reader lands): the date
 * and comment a recorder wrote into a CSV preamble or an MDF4 header, so the upload and the
 * drive-log page can offer them as the drive log's test date and notes.
 */
import type { SourceMetadataEntry } from "./types.ts";

export interface MetadataDetails {
  /** The recording date as YYYY-MM-DD, when a date key holds a readable date. */
  date?: string;
  /** A comment, description or note the recorder kept. */
  comment?: string;
}

export function metadataDetails(_metadata: readonly SourceMetadataEntry[]): MetadataDetails {
  return {};
}
