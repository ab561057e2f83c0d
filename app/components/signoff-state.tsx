import { signoffStateLabels, type SignoffState } from "~/lib/domain/signoff";

const tone: Record<SignoffState, string> = {
  proposed: "border-indigo-300 bg-indigo-50 text-indigo-900",
  approved: "border-green-300 bg-green-50 text-green-900",
  rejected: "border-red-300 bg-red-50 text-red-900",
  superseded: "border-amber-500 bg-amber-50 text-amber-950",
  withdrawn: "border-neutral-300 bg-neutral-100 text-neutral-800",
};

/** A sign-off's state in words, in a small outlined label (the words carry it, not the colour). */
export function SignoffStateBadge({ state }: { state: SignoffState }) {
  return (
    <span
      className={`inline-block rounded-full border px-2 py-0.5 text-xs font-semibold ${tone[state]}`}
      data-signoff-state={state}
    >
      {signoffStateLabels[state]}
    </span>
  );
}
