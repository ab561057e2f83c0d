import { Form } from "react-router";
import type { Target } from "~/lib/domain/targets";
import { CsrfInput } from "./csrf-input";
import { buttonClass, IntentButton, SubmitButton } from "./form";
import { useAskFirst } from "./use-ask-first";

/**
 * "Delete target" asks first (issue 11): with JavaScript the question opens in place and takes
 * the focus (Escape or "Keep the target" closes it and gives the focus back to the button);
 * without, the button posts and the page comes back with the same question. Only the second
 * button, which posts confirm=yes, deletes.
 */
export function DeleteTarget({
  vehicleId,
  target,
  asked,
}: {
  vehicleId: number;
  target: Target;
  asked: boolean;
}) {
  const { hydrated, asking, askButton, question, open, keep } = useAskFirst(asked);
  const panelId = `delete-target-${target.id}`;
  return (
    <div className="space-y-3 border-t border-neutral-100 pt-3">
      {hydrated ? (
        <button
          ref={askButton}
          type="button"
          aria-expanded={asking}
          aria-controls={panelId}
          onClick={open}
          className={buttonClass("danger")}
        >
          Delete target <span className="sr-only">{target.name}</span>
        </button>
      ) : (
        <IntentButton intent="delete-target" fields={{ targetId: target.id }} tone="danger">
          Delete target <span className="sr-only">{target.name}</span>
        </IntentButton>
      )}
      {asking ? (
        <div
          id={panelId}
          ref={question}
          role="group"
          tabIndex={-1}
          autoFocus={asked}
          aria-labelledby={`${panelId}-question`}
          aria-describedby={`${panelId}-effect`}
          onKeyDown={(e) => {
            if (e.key === "Escape" && hydrated) {
              e.preventDefault();
              keep();
            }
          }}
          className="rounded-md border border-red-200 bg-red-50 p-3 focus:outline-2 focus:outline-red-600"
          data-delete-confirm={target.id}
        >
          <p id={`${panelId}-question`} className="text-sm font-semibold text-red-900">
            Delete the target “{target.name}”?
          </p>
          <p id={`${panelId}-effect`} className="mt-1 text-sm text-red-900">
            Its pass and fail verdicts disappear from every drive log of this vehicle. This cannot
            be undone.
          </p>
          <Form method="post" className="mt-3 flex flex-wrap items-center gap-3">
            <CsrfInput />
            <input type="hidden" name="targetId" value={target.id} />
            <input type="hidden" name="confirm" value="yes" />
            <SubmitButton name="intent" value="delete-target" tone="danger">
              Yes, delete <span className="sr-only">{target.name}</span>
            </SubmitButton>
            {hydrated ? (
              <button type="button" onClick={keep} className={buttonClass("secondary")}>
                Keep the target
              </button>
            ) : (
              <a href={`/vehicles/${vehicleId}#targets`} className={buttonClass("secondary")}>
                Keep the target
              </a>
            )}
          </Form>
        </div>
      ) : null}
    </div>
  );
}
