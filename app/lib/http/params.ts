import { NotFound } from "../domain/errors";

/** A numeric id from the URL; anything else is a 404 (not a 500), as for a missing record. */
export function idParam(value: string | undefined): number {
  const id = Number(value);
  if (!value || !/^\d{1,15}$/.test(value) || !Number.isSafeInteger(id) || id < 1) {
    throw new NotFound("Not found.");
  }
  return id;
}
