import { Form, useNavigation } from "react-router";
import { CsrfInput } from "./csrf-input";
import { SubmitButton } from "./form";
import { inputClass } from "./form-fields";

/** The sign-off page's reply to a refused step: which form, and why. */
export interface StepRefusal {
  step: "approve" | "reject" | "withdraw";
  error: string;
  text: string;
}

function TextBox({
  id,
  name,
  label,
  hint,
  error,
  defaultValue,
}: {
  id: string;
  name: string;
  label: string;
  hint: string;
  error?: string;
  defaultValue?: string;
}) {
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-medium text-neutral-800">
        {label}
      </label>
      <textarea
        id={id}
        name={name}
        rows={2}
        defaultValue={defaultValue}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-hint ${id}-error` : `${id}-hint`}
        autoFocus={!!error}
        className={`mt-1 ${inputClass}`}
      />
      <p id={`${id}-hint`} className="mt-1 text-xs text-neutral-500">
        {hint}
      </p>
      {error ? (
        <p id={`${id}-error`} className="mt-1 text-sm text-red-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/**
 * Approve (a comment is optional) and reject (say why): for whoever may decide. The four-eyes
 * reason replaces the forms for everyone else, the proposer first.
 */
export function DecisionForms({
  refusal,
  reasonNot,
}: {
  refusal: StepRefusal | null;
  /** Null when the reader may decide; else why not, in a sentence. */
  reasonNot: string | null;
}) {
  const busy = useNavigation().state === "submitting";
  if (reasonNot)
    return (
      <p className="text-sm text-neutral-700" data-four-eyes>
        {reasonNot}
      </p>
    );
  return (
    <div className="space-y-6">
      <Form method="post" className="space-y-3" id="approve-form">
        <CsrfInput />
        <TextBox
          id="approve-comment"
          name="comment"
          label="Comment (optional)"
          hint="Frozen with the approval and printed in the evidence report."
          error={refusal?.step === "approve" ? refusal.error : undefined}
          defaultValue={refusal?.step === "approve" ? refusal.text : undefined}
        />
        <SubmitButton name="intent" value="approve">
          {busy ? "Working…" : "Approve sign-off"}
        </SubmitButton>
      </Form>
      <Form method="post" className="space-y-3 border-t border-neutral-200 pt-4" id="reject-form">
        <CsrfInput />
        <TextBox
          id="reject-comment"
          name="comment"
          label="Why it is rejected"
          hint="Required; the proposer gets it by e-mail."
          error={refusal?.step === "reject" ? refusal.error : undefined}
          defaultValue={refusal?.step === "reject" ? refusal.text : undefined}
        />
        <SubmitButton name="intent" value="reject" tone="danger">
          Reject sign-off
        </SubmitButton>
      </Form>
    </div>
  );
}

/** Withdraw a proposed or approved sign-off (engineers and admins): a step with a reason. */
export function WithdrawForm({ refusal }: { refusal: StepRefusal | null }) {
  const error = refusal?.step === "withdraw" ? refusal.error : undefined;
  return (
    <details className="group" open={!!error}>
      <summary className="cursor-pointer text-sm font-medium text-red-800 select-none">
        Withdraw this sign-off
      </summary>
      <Form method="post" className="mt-3 space-y-3">
        <CsrfInput />
        <TextBox
          id="withdraw-reason"
          name="reason"
          label="Reason"
          hint="Required. Withdrawing keeps the record and its history; it is not a deletion."
          error={error}
          defaultValue={refusal?.step === "withdraw" ? refusal.text : undefined}
        />
        <SubmitButton name="intent" value="withdraw" tone="danger">
          Withdraw sign-off
        </SubmitButton>
      </Form>
    </details>
  );
}
