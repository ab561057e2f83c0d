/**
 * Every read and write of a team's sign-offs (docs/signoff.md). Another team's sign-off is a 404
 * like one that does not exist. Rules are in domain/signoff.ts; this module freezes the evidence,
 * keeps the states and the history, audits every step and sends the mail.
 */
import type { Role } from "../domain/roles";
import type {
  ClaimCheck,
  SignoffInput,
  SignoffJson,
  SignoffRecord,
  SignoffState,
} from "../domain/signoff";
import type { Tx } from "../analyses/queue.server";

/** Who is acting, as requireAccess gives it, plus where from (for the audit log). */
export interface SignoffCaller {
  userId: number;
  role: Role;
  ip: string;
}

/** One damper variant's line on the vehicle page's Sign-off card. */
export interface VariantSignoff {
  damperVariant: string;
  /** Finished drive logs of this variant. */
  logs: number;
  /** The newest sign-off of the variant, if any (any state), and the newest approved one. */
  latest: SignoffJson | null;
  approved: SignoffJson | null;
}

export function signoffData(teamId: number) {
  void teamId;
  const stub = (): never => {
    throw new Error("contract stub: data/signoffs.server.ts");
  };
  return {
    /** Newest first; only the vehicle's when given (404 for another team's vehicle). */
    async list(filter: { vehicleId?: number }): Promise<SignoffJson[]> {
      void filter;
      return stub();
    },
    async get(id: number): Promise<SignoffJson> {
      void id;
      return stub();
    },
    /** The frozen record as stored (canonical JSON text) and parsed. */
    async record(id: number): Promise<{ text: string; record: SignoffRecord }> {
      void id;
      return stub();
    },
    /** The claim check a proposal would get now (the form shows it before sending). */
    async check(
      vehicleId: number,
      input: SignoffInput,
    ): Promise<{ checks: ClaimCheck[]; problems: string[]; blocked: boolean }> {
      void vehicleId;
      void input;
      return stub();
    },
    /**
     * Proposes: Invalid (400) when blocked, listing every problem and blocking claim; Forbidden
     * below engineer. Freezes the evidence, audits, mails the possible approvers.
     */
    async propose(
      vehicleId: number,
      input: SignoffInput,
      caller: SignoffCaller,
    ): Promise<SignoffJson> {
      void vehicleId;
      void input;
      void caller;
      return stub();
    },
    /**
     * Approves a proposal: Forbidden for its proposer and per the team's approvers setting;
     * Conflict (409) unless proposed. Adds the approval to the record, stores the digest and the
     * evidence report's PDF, audits and mails the proposer.
     */
    async approve(id: number, comment: string, caller: SignoffCaller): Promise<SignoffJson> {
      void id;
      void comment;
      void caller;
      return stub();
    },
    async reject(id: number, comment: string, caller: SignoffCaller): Promise<SignoffJson> {
      void id;
      void comment;
      void caller;
      return stub();
    },
    /** Withdraws a proposed or approved sign-off (engineer or admin): a step, never a deletion. */
    async withdraw(id: number, reason: string, caller: SignoffCaller): Promise<SignoffJson> {
      void id;
      void reason;
      void caller;
      return stub();
    },
    /**
     * The evidence report: an approved (or later superseded/withdrawn after approval) sign-off's
     * stored PDF, byte for byte; otherwise a draft rendered now from the frozen record.
     */
    async report(id: number): Promise<{ pdf: Buffer; fileName: string }> {
      void id;
      return stub();
    },
    /** The Sign-off card: one line per damper variant of the vehicle's drive logs and sign-offs. */
    async variants(vehicleId: number): Promise<VariantSignoff[]> {
      void vehicleId;
      return stub();
    },
  };
}

/**
 * Marks every open (proposed or approved) sign-off resting on these drive logs or targets as
 * superseded with the reason, inside the caller's transaction; returns how many. Called when a
 * claimed drive log gets a new analysis (save.server.ts), a target changes or is deleted
 * (targets.server.ts) and a drive log is deleted (vehicles.server.ts removeLog).
 */
export async function supersedeSignoffs(
  tx: Tx,
  teamId: number,
  on: { logIds?: number[]; targetIds?: number[] },
  reason: string,
): Promise<number> {
  void tx;
  void teamId;
  void on;
  void reason;
  throw new Error("contract stub");
}

export type { SignoffState };
