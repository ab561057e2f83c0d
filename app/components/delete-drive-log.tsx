import { Form } from "react-router";
import { CsrfInput } from "./csrf-input";
import { buttonClass, IntentButton, SubmitButton } from "./form";
import { Card } from "./page";
import { useAskFirst } from "./use-ask-first";

/**
 * "Delete drive log" (engineers and admins; issue 16) asks first, like "Delete target": with
 * JavaScript the question opens in place and takes the focus (Escape or "Keep the drive log"
 * closes it); without, the button posts and the page comes back with the same question. Only
 * the second button, which posts confirm=yes, deletes.
 */
export function DeleteDriveLog({
  logHref,
  fileName,
  asked,
}: {
  logHref: string;
  fileName: string;
  asked: boolean;
}) {
  const { hydrated, asking, askButton, question, open, keep } = useAskFirst(asked);
  return (
    <Card title="Delete drive log" id="delete-log">
      <p className="mb-3 max-w-3xl text-sm text-neutral-600">
        For a recording that should never have been uploaded. Its analyses, share links and comments
        go with it; sign-offs that rest on it are marked superseded, and their frozen evidence
        stays.
      </p>
      {hydrated ? (
        <button
          ref={askButton}
          type="button"
          aria-expanded={asking}
          aria-controls="delete-log-question"
          onClick={open}
          className={buttonClass("danger")}
        >
          Delete drive log
        </button>
      ) : (
        <IntentButton intent="delete-log" fields={{}} tone="danger">
          Delete drive log
        </IntentButton>
      )}
      {asking ? (
        <div
          id="delete-log-question"
          ref={question}
          role="group"
          tabIndex={-1}
          autoFocus={asked}
          aria-labelledby="delete-log-q"
          aria-describedby="delete-log-effect"
          onKeyDown={(e) => {
            if (e.key === "Escape" && hydrated) {
              e.preventDefault();
              keep();
            }
          }}
          className="mt-3 rounded-md border border-red-200 bg-red-50 p-3 focus:outline-2 focus:outline-red-600"
          data-delete-log-confirm
        >
          <p id="delete-log-q" className="text-sm font-semibold break-all text-red-900">
            Delete the drive log “{fileName}”?
          </p>
          <p id="delete-log-effect" className="mt-1 text-sm text-red-900">
            Every analysis version, share link and comment of it is deleted; open sign-offs that
            name it are superseded. This cannot be undone.
          </p>
          <Form method="post" className="mt-3 flex flex-wrap items-center gap-3">
            <CsrfInput />
            <input type="hidden" name="confirm" value="yes" />
            <SubmitButton name="intent" value="delete-log" tone="danger">
              Yes, delete the drive log
            </SubmitButton>
            {hydrated ? (
              <button type="button" onClick={keep} className={buttonClass("secondary")}>
                Keep the drive log
              </button>
            ) : (
              <a href={logHref} className={buttonClass("secondary")}>
                Keep the drive log
              </a>
            )}
          </Form>
        </div>
      ) : null}
    </Card>
  );
}
