import { apiError } from "~/lib/http/edge.server";

// Any other /api/v1/ URL answers in the API's own JSON error shape, not with an HTML page.
export function loader() {
  return apiError(404, "not_found", "There is no such API endpoint.");
}

export function action() {
  return apiError(404, "not_found", "There is no such API endpoint.");
}
