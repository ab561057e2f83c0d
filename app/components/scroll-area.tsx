import { useEffect, useRef, useState } from "react";

/**
 * A wide table on a narrow screen scrolls inside this box, never the page. While it does not fit,
 * it shows its cue (shadows at the edge with more to see, and a line under it), becomes a named
 * region and takes keyboard focus, so arrow keys scroll it (a scrollable region must be
 * reachable without a mouse). On a wide screen it is a plain box. `relative` keeps absolutely
 * placed text (sr-only labels in cells) inside the box; otherwise it widens the page.
 */
export function ScrollArea({ label, children }: { label: string; children: React.ReactNode }) {
  const ref = useRef<HTMLDivElement>(null);
  const [overflowing, setOverflowing] = useState(false);
  useEffect(() => {
    const box = ref.current;
    if (!box) return;
    const check = () => setOverflowing(box.scrollWidth > box.clientWidth + 1);
    check();
    const observer = new ResizeObserver(check);
    observer.observe(box);
    if (box.firstElementChild) observer.observe(box.firstElementChild);
    return () => observer.disconnect();
  }, []);
  return (
    <div>
      <div
        ref={ref}
        data-scroll-area={overflowing ? "overflowing" : "fits"}
        {...(overflowing ? { role: "region", "aria-label": label, tabIndex: 0 } : {})}
        className="scroll-cue relative overflow-x-auto rounded focus-visible:outline-2 focus-visible:outline-indigo-600"
      >
        {children}
      </div>
      {overflowing ? (
        <p aria-hidden="true" className="mt-2 text-xs text-neutral-500">
          Scroll sideways for more columns →
        </p>
      ) : null}
    </div>
  );
}
