import { useEffect, useRef, useState } from "react";
import { useHydrated } from "./use-hydrated";

/**
 * The state of a destructive action that asks first ("Delete target", "Delete drive log"): with
 * JavaScript the question opens in place and takes the focus, and `keep` closes it and gives the
 * focus back to the asking button; without, the page comes back with the question (`asked`).
 * Call `open()` from the asking button's click.
 */
export function useAskFirst(asked: boolean) {
  const hydrated = useHydrated();
  const [asking, setAsking] = useState(asked);
  const askButton = useRef<HTMLButtonElement>(null);
  const question = useRef<HTMLDivElement>(null);
  const opened = useRef(false);
  useEffect(() => {
    if (asking && opened.current) question.current?.focus();
  }, [asking]);
  return {
    hydrated,
    asking,
    askButton,
    question,
    open: () => {
      opened.current = true;
      setAsking(true);
    },
    keep: () => {
      setAsking(false);
      askButton.current?.focus();
    },
  };
}
