import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useEffect, useMemo, useRef, useState } from "react";
import { useRevalidator } from "react-router";
import { isActive, type LogProgress } from "./log-status";

/** How often the page asks while an analysis runs, ms (the job writes progress every 500 ms). */
const POLL_MS = 1000;

/**
 * Polls GET /vehicles/:id/status with TanStack Query while any drive log is queued or
 * analysing, and stops when all are done or failed. When one finishes, the page's loader runs
 * again (for its new figures) and `announcement` says so, for a polite live region.
 */
export function useLogProgress(
  vehicleId: number,
  fromLoader: LogProgress[],
  names: Map<number, string>,
) {
  const queryClient = useQueryClient();
  const revalidator = useRevalidator();
  const key = useMemo(() => ["vehicle-log-status", vehicleId], [vehicleId]);
  // Fresh loader data (after an upload or a finished analysis) is at least as new as the poll's.
  useEffect(() => {
    queryClient.setQueryData(key, fromLoader);
  }, [queryClient, key, fromLoader]);
  const current = queryClient.getQueryData<LogProgress[]>(key) ?? fromLoader;
  const running =
    current.some((l) => isActive(l.status)) || fromLoader.some((l) => isActive(l.status));
  const query = useQuery({
    queryKey: key,
    queryFn: async (): Promise<LogProgress[]> => {
      const response = await fetch(`/vehicles/${vehicleId}/status`, {
        headers: { Accept: "application/json" },
      });
      if (!response.ok) throw new Error(`status ${response.status}`);
      return ((await response.json()) as { logs: LogProgress[] }).logs;
    },
    initialData: fromLoader,
    staleTime: 0,
    refetchOnWindowFocus: false,
    refetchInterval: running ? POLL_MS : false,
  });

  const statuses = useMemo(() => {
    const map = new Map(fromLoader.map((l) => [l.id, l]));
    for (const l of query.data) map.set(l.id, l);
    return map;
  }, [fromLoader, query.data]);

  const [announcement, setAnnouncement] = useState("");
  // Drive logs on the page when it opened are only recorded; a log seen to finish later is
  // announced, and so is one that appeared later already finished (a small file can be analysed
  // before the page first hears of it).
  const seen = useRef<Map<number, LogProgress["status"]> | null>(null);
  useEffect(() => {
    if (!seen.current) {
      seen.current = new Map([...statuses].map(([id, log]) => [id, log.status]));
      return;
    }
    const finished: string[] = [];
    for (const [id, log] of statuses) {
      const before = seen.current.get(id);
      if ((before === undefined || isActive(before)) && !isActive(log.status)) {
        const name = names.get(id) ?? `drive log ${id}`;
        finished.push(
          log.status === "done" ? `Analysis of ${name} finished.` : `Analysis of ${name} failed.`,
        );
      }
      seen.current.set(id, log.status);
    }
    if (finished.length) {
      setAnnouncement(finished.join(" "));
      void revalidator.revalidate();
    }
  }, [statuses, names, revalidator]);

  return { statuses, announcement, pollFailed: query.isError };
}

/**
 * While the drive log is queued or analysing, polls GET /api/v1/logs/:logId (the session
 * cookie is enough) with TanStack Query; when it ends, the loader runs again for the results.
 */
export function useLiveStatus(log: LogProgress & { fileName: string }) {
  const revalidator = useRevalidator();
  const [announcement, setAnnouncement] = useState("");
  const query = useQuery({
    queryKey: ["drive-log-status", log.id, log.status],
    queryFn: async (): Promise<LogProgress> => {
      const response = await fetch(`/api/v1/logs/${log.id}`, {
        headers: { Accept: "application/json" },
      });
      if (!response.ok) throw new Error(`status ${response.status}`);
      return ((await response.json()) as { log: LogProgress }).log;
    },
    initialData: { id: log.id, status: log.status, progress: log.progress, stage: log.stage },
    staleTime: 0,
    refetchInterval: (q) => (q.state.data && isActive(q.state.data.status) ? 1000 : false),
  });
  const before = useRef(log.status);
  useEffect(() => {
    const now = query.data.status;
    if (isActive(before.current) && !isActive(now)) {
      setAnnouncement(now === "done" ? "Analysis finished." : "Analysis failed.");
      void revalidator.revalidate();
    }
    before.current = now;
  }, [query.data.status, revalidator]);
  return { log: query.data, announcement };
}
