/**
 * The offer to take a file's own recording date and comment (metadataDetails of its metadata)
 * as the drive log's test date and notes, where those are still empty. One click; the server
 * reads the details from the stored result again, so nothing typed in the browser is taken.
 */
import { Form } from "react-router";
import { CsrfInput } from "./csrf-input";
import { SubmitButton } from "./form";

export function FileDetailsOffer({ date, comment }: { date?: string; comment?: string }) {
  if (!date && !comment) return null;
  const what = date && comment ? "date and comment" : date ? "date" : "comment";
  return (
    <section
      aria-labelledby="file-details-title"
      className="rounded-lg border border-indigo-200 bg-indigo-50 p-4 text-sm"
    >
      <h2 id="file-details-title" className="font-semibold text-indigo-950">
        The file names its own test details
      </h2>
      <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 text-indigo-950">
        {date ? (
          <>
            <dt>Recorded on</dt>
            <dd>{date}</dd>
          </>
        ) : null}
        {comment ? (
          <>
            <dt>Comment</dt>
            <dd className="break-words">{comment}</dd>
          </>
        ) : null}
      </dl>
      <Form method="post" className="mt-3">
        <CsrfInput />
        <SubmitButton name="intent" value="use-file-details" tone="secondary">
          Use the file's {what}
        </SubmitButton>
      </Form>
    </section>
  );
}
