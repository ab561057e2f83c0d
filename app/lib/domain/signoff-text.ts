/**
 * Sign-offs in words, as the pages show them (issue 16): the approvers setting, the claim
 * statuses and the steps of the history. The rules are in ./signoff.
 */
import type { ClaimStatus, SignoffApprovers, SignoffState, SignoffStep } from "./signoff";

export const signoffApproverLabels: Record<SignoffApprovers, string> = {
  engineers: "any engineer or admin other than the proposer",
  admins: "only an admin other than the proposer",
};

export const claimStatusLabels: Record<ClaimStatus, string> = {
  pass: "pass",
  fail: "fail",
  "not-covered": "not covered",
};

/** What each step of a sign-off's history says happened. */
export const signoffStepLabels: Record<SignoffStep, string> = {
  proposed: "Proposed",
  approved: "Approved",
  rejected: "Rejected",
  superseded: "Superseded",
  withdrawn: "Withdrawn",
};

/** One sentence under a sign-off's state: what it means for the damper variant now. */
export const signoffStateHints: Record<SignoffState, string> = {
  proposed: "Waiting for a second person to approve or reject it.",
  approved: "Released: the evidence below is frozen and its digest recorded.",
  rejected: "Not released. Propose again once the comment is dealt with.",
  superseded: "No longer current: the evidence it rests on has changed. Propose again.",
  withdrawn: "Withdrawn by the team; the record stays for reference.",
};
