/** TanStack Query hooks for the charts' JSON (resource routes; the session cookie is enough). */
import { useQuery } from "@tanstack/react-query";
import { ChartFetchError } from "./chart-frame";
import type { ChartsResponse, CurvesResponse, SpeedPreviewResponse } from "./types";

async function getJson<T>(url: string, revalidate = false): Promise<T> {
  const response = await fetch(url, {
    headers: { Accept: "application/json" },
    // A known new analysis version must not come from the browser's short HTTP cache.
    cache: revalidate ? "no-cache" : "default",
  });
  if (!response.ok) {
    let message = `the server answered ${response.status}`;
    let code: string | undefined;
    const text = await response.text().catch(() => "");
    try {
      const body = JSON.parse(text) as { error?: { code?: string; message?: string } | string };
      const m = typeof body.error === "string" ? body.error : body.error?.message;
      if (typeof body.error === "object") code = body.error.code;
      if (m) message = m;
    } catch {
      // A plain-text answer (the shared error responses): show it if it is a sentence.
      if (text && text.length < 300 && !text.trimStart().startsWith("<")) message = text.trim();
    }
    throw new ChartFetchError(response.status, message, code);
  }
  return (await response.json()) as T;
}

const retry = (count: number, error: unknown) =>
  count < 2 && !(error instanceof ChartFetchError && error.status >= 400 && error.status < 500);

/**
 * `analysisVersion` (optional): the version the page knows is latest; a new one is fetched past
 * the HTTP cache instead of waiting for the 30 s cache of the response to run out.
 */
export function useChartsQuery(url: string, analysisVersion?: number) {
  return useQuery({
    queryKey: ["charts", url, analysisVersion ?? null],
    queryFn: () => getJson<ChartsResponse>(url, analysisVersion !== undefined),
    retry,
  });
}

export function useCurvesQuery(url: string) {
  return useQuery({
    queryKey: ["curves", url],
    queryFn: () => getJson<CurvesResponse>(url),
    retry,
  });
}

/** The channel chooser's preview of the picked speeds; the URL carries the picks and units. */
export function useSpeedPreviewQuery(url: string) {
  return useQuery({
    queryKey: ["channel-preview", url],
    queryFn: () => getJson<SpeedPreviewResponse>(url),
    staleTime: Infinity,
    retry,
  });
}
