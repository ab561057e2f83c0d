import type { SubmissionResult } from "@conform-to/react";
import { useEffect, useState } from "react";

/**
 * A <details> around a form: open after a refused submission (also without JavaScript), closed
 * after a saved one, and otherwise as the user leaves it.
 */
export function ReplyDisclosure({
  reply,
  forceOpen = false,
  summary,
  className,
  children,
}: {
  reply: SubmissionResult<string[]> | null;
  /** Open regardless of the reply (a delete waiting for its confirmation). */
  forceOpen?: boolean;
  summary: React.ReactNode;
  className?: string;
  children: React.ReactNode;
}) {
  const refused = reply?.status === "error";
  const [open, setOpen] = useState(refused || forceOpen);
  useEffect(() => {
    if (reply) setOpen(reply.status === "error");
  }, [reply]);
  return (
    <details className={className} open={open} onToggle={(e) => setOpen(e.currentTarget.open)}>
      <summary className="cursor-pointer">{summary}</summary>
      {children}
    </details>
  );
}
