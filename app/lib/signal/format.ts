/**
 * Which reader a drive log needs, told by its first bytes, never by its name: an ASAM MDF4 file
 * starts with the identification block's file id "MDF     " (or "UnFinMF " while a logger has
 * not finalised it; ASAM MDF 4.2, identification block); anything else is read as CSV text.
 */
import type { SourceFormat } from "./types.ts";

const MDF = "MDF     ";
const UNFINISHED = "UnFinMF ";

/** The format of a file whose first bytes (at least 8 for a sure answer) are `head`. */
export function sniffFormat(head: Uint8Array): SourceFormat {
  if (head.length < 8) return "csv";
  const id = String.fromCharCode(...head.subarray(0, 8));
  return id === MDF || id === UNFINISHED ? "mdf4" : "csv";
}
