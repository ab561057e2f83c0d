/**
 * The authorization matrix (issue 12, build 1): for every route file in app/routes.ts, the
 * requests that reach it and who may make them, written as a policy rather than as numbers.
 * tests/integration/authorization-matrix.test.ts turns each request into one cell per caller
 * and checks the status and that no other team's data is in the answer.
 *
 * To add a route: add its file here with its requests (every method and every form intent).
 * A page's `page` and `form` requests and a resource route's `json` GETs get their React Router
 * `.data` twin automatically.
 */

export const CALLERS = [
  "anonymous",
  "viewer",
  "technician",
  "engineer",
  "admin",
  "otherTeam",
  "shareGuest",
] as const;
export type Caller = (typeof CALLERS)[number];
export type HomeRole = "viewer" | "technician" | "engineer" | "admin";
const RANK: Record<HomeRole, number> = { viewer: 1, technician: 2, engineer: 3, admin: 4 };

/** Ids of the seeded data. "home" is the callers' team; "other" is the team of `otherTeam`. */
export interface TeamFixture {
  teamId: number;
  vehicleId: number;
  logIds: [number, number];
  shareId: number;
  shareToken: string;
  compareShareToken: string;
  commentId: number;
  targetId: number;
  /** A proposed sign-off of the vehicle (issue 16). */
  signoffId: number;
  /** A share link of that sign-off. */
  signoffShareToken: string;
  invitationId: number;
  adminMembershipId: number;
}
export interface Fixtures {
  home: TeamFixture;
  other: TeamFixture;
  /** Throwaway objects of the home team, owned by a member who is none of the callers. */
  spare: {
    sessionId: string;
    apiTokenId: number;
    commentId: number;
    formShareId: number;
    apiShareId: number;
  };
  revokedShareToken: string;
}

/**
 * How a request arrives. page: a document GET; form: a urlencoded form post to a page or
 * resource route (with the CSRF token); page.data / form.data: React Router's single-fetch
 * twins (GET /path.data, POST /path.data); json: a fetch of a resource route with the session;
 * api-bearer / api-cookie: /api/v1 with the caller's API token or with the session cookie;
 * upload: a multipart post (form or API); share: a share link's token, for every caller alike.
 */
export type Way =
  | "page"
  | "page.data"
  | "form"
  | "form.data"
  | "json"
  | "json.data"
  | "api-bearer"
  | "api-cookie"
  | "upload"
  | "upload-bearer"
  | "share";

/**
 * Who may: public (everyone gets `ok`), signedIn (any account), team (a home role of at least
 * `min`; `scoped`: the URL names a home-team object, so another team's member gets 404, else
 * they act in their own team and get `ok`), share (the token alone).
 */
export type Access =
  | { kind: "public" }
  | { kind: "signedIn" }
  | { kind: "team"; min: HomeRole; scoped: boolean }
  | { kind: "share" };

/** Undo steps for cells that are allowed to change something (run after the cell). */
export type Undo = "unarchive-vehicle" | "unrevoke-invitation" | "unrevoke-spare-token";

export interface Probe {
  way: Way;
  method: "GET" | "POST" | "PATCH" | "DELETE";
  path: (fx: Fixtures) => string;
  intent?: string;
  /** Form fields (urlencoded, or multipart for uploads); the CSRF token is added. */
  form?: (fx: Fixtures, caller: Caller) => Record<string, string>;
  json?: unknown;
  /** Send no body at all (and no Content-Type): a refusal before anything else, 400. */
  empty?: boolean;
  /** A multipart Content-Type without its boundary, with a few bytes of body. */
  noBoundary?: boolean;
  access: Access;
  /** The status an allowed caller gets. Harmless payloads: often a 400 after the role check. */
  ok: number;
  /** Text an allowed caller's answer contains (shows the role check was passed). */
  okText?: string;
  /** Statuses that differ from the policy, per caller. */
  except?: Partial<Record<Caller, number>>;
  /** The same for the `.data` twin, when not just `except` with 302 read as 202. */
  dataExcept?: Partial<Record<Caller, number>>;
  /** An allowed answer shows the caller's own team's marker (a positive control for the leak check). */
  shows?: boolean;
  undo?: Undo;
}

export type Row = { probes: Probe[] } | { coveredBy: string };

const anyone: Access = { kind: "public" };
const signedIn: Access = { kind: "signedIn" };
const team = (min: HomeRole, scoped = true): Access => ({ kind: "team", min, scoped });
const share: Access = { kind: "share" };

const v = (fx: Fixtures) => `/vehicles/${fx.home.vehicleId}`;
const log = (fx: Fixtures) => `${v(fx)}/logs/${fx.home.logIds[0]}`;
const pair = (fx: Fixtures) => fx.home.logIds.join(",");
const signoffPath = (fx: Fixtures) => `${v(fx)}/signoffs/${fx.home.signoffId}`;
const get = (way: Way, path: Probe["path"], access: Access, ok = 200, more: Partial<Probe> = {}) =>
  ({ way, method: "GET", path, access, ok, ...more }) satisfies Probe;
const post = (
  way: Way,
  path: Probe["path"],
  intent: string | undefined,
  form: Probe["form"],
  access: Access,
  ok: number,
  more: Partial<Probe> = {},
) => ({ way, method: "POST", path, intent, form, access, ok, ...more }) satisfies Probe;
/** A post with no form body: 400 for everyone, before any other check (issue 12 §7). */
const noBody = (path: Probe["path"]): Probe => ({
  way: "form",
  method: "POST",
  path,
  access: anyone,
  ok: 400,
  empty: true,
});
/** A post to a route without an action: 405 for everyone. */
const noAction = (way: Way, path: Probe["path"]): Probe => ({
  way,
  method: "POST",
  path,
  form: () => ({}),
  access: anyone,
  ok: 405,
});
const withIntent = (intent: string, fields: Record<string, string> = {}) => ({ intent, ...fields });

export const matrix: Record<string, Row> = {
  "routes/_shell.tsx": { coveredBy: "its loader runs in every page below (header only)" },
  "routes/_auth.tsx": { coveredBy: "a frame without a loader for the signed-out pages" },
  "routes/home.tsx": {
    probes: [noAction("page", () => "/?index"), get("page", () => "/", anyone)],
  },
  "routes/vehicles.tsx": {
    probes: [
      noAction("page", () => "/vehicles"),
      get("page", () => "/vehicles", team("viewer", false), 200, { shows: true }),
    ],
  },
  "routes/vehicles.new.tsx": {
    probes: [
      noBody(() => "/vehicles/new"),
      get("page", () => "/vehicles/new", team("engineer", false)),
      // An empty form: allowed callers get the field errors (400) and nothing is created.
      post(
        "form",
        () => "/vehicles/new",
        "save",
        () => withIntent("save"),
        team("engineer", false),
        400,
      ),
    ],
  },
  "routes/vehicle.tsx": {
    probes: [
      noBody(v),
      get("page", v, team("viewer"), 200, { shows: true }),
      post("form", v, "archive", () => withIntent("archive"), team("engineer"), 200, {
        undo: "unarchive-vehicle",
      }),
      post("form", v, "restore", () => withIntent("restore"), team("engineer"), 200),
      post("form", v, "create-target", () => withIntent("create-target"), team("engineer"), 400),
      post(
        "form",
        v,
        "update-target",
        (fx) => withIntent("update-target", { targetId: String(fx.home.targetId) }),
        team("engineer"),
        400,
      ),
      // Without confirm=yes the page only asks back (200) and nothing is deleted.
      post(
        "form",
        v,
        "delete-target",
        (fx) => withIntent("delete-target", { targetId: String(fx.home.targetId) }),
        team("engineer"),
        200,
      ),
      // A multipart body without its boundary: 400 once the role is checked (issue 12 §7).
      {
        way: "upload",
        method: "POST",
        path: v,
        noBoundary: true,
        access: team("technician"),
        ok: 400,
      },
      // The form upload with no file: technicians and up get "choose a file" (400).
      post(
        "upload",
        v,
        "upload",
        () => withIntent("upload", { condition: "idle-neutral" }),
        team("technician"),
        400,
        {
          okText: "Choose at least one drive log file",
        },
      ),
    ],
  },
  "routes/vehicle.edit.tsx": {
    probes: [
      noBody((fx) => `${v(fx)}/edit`),
      get("page", (fx) => `${v(fx)}/edit`, team("engineer"), 200, { shows: true }),
      post(
        "form",
        (fx) => `${v(fx)}/edit`,
        "save",
        () => withIntent("save"),
        team("engineer"),
        400,
      ),
    ],
  },
  "routes/drive-log.tsx": {
    probes: [
      noBody(log),
      get("page", log, team("viewer"), 200, { shows: true }),
      // The log is done, so the column choice is refused after the role check (409, §10).
      post("form", log, "map", () => withIntent("map"), team("technician"), 409),
      // The demo log's file names no date or comment, so there is nothing to take (409).
      post(
        "form",
        log,
        "use-file-details",
        () => withIntent("use-file-details"),
        team("technician"),
        409,
      ),
      post(
        "form",
        log,
        "reanalyse",
        () => withIntent("reanalyse", { firingOrder: "-1" }),
        team("engineer"),
        400,
      ),
      // Without confirm=yes the page only asks back (200) and nothing is deleted.
      post("form", log, "delete-log", () => withIntent("delete-log"), team("engineer"), 200, {
        okText: "confirmDeleteLog",
      }),
    ],
  },
  // Sign-off pages (issue 16): every write is the engineer's or admin's; technicians and viewers
  // get 403. The payloads are refused after the role check (400), so nothing changes.
  "routes/signoff.new.tsx": {
    probes: [
      noBody((fx) => `${v(fx)}/signoffs/new`),
      get("page", (fx) => `${v(fx)}/signoffs/new`, team("engineer"), 200, { shows: true }),
      // No target claimed: "Claim at least one target." (400).
      post(
        "form",
        (fx) => `${v(fx)}/signoffs/new`,
        "propose",
        () => withIntent("propose", { damperVariant: "A", note: "" }),
        team("engineer"),
        400,
        { okText: "Claim at least one target." },
      ),
      post(
        "form",
        (fx) => `${v(fx)}/signoffs/new`,
        "check",
        () => withIntent("check", { damperVariant: "A", note: "" }),
        team("engineer"),
        400,
        { okText: "Claim at least one target." },
      ),
    ],
  },
  "routes/signoff.tsx": {
    probes: [
      noBody(signoffPath),
      get("page", signoffPath, team("viewer"), 200, { shows: true }),
      // A comment over 2000 characters: refused on its field after the role check.
      post(
        "form",
        signoffPath,
        "approve",
        () => withIntent("approve", { comment: "x".repeat(2001) }),
        team("engineer"),
        400,
        { okText: "The comment is at most 2000 characters." },
      ),
      post(
        "form",
        signoffPath,
        "reject",
        () => withIntent("reject", { comment: "" }),
        team("engineer"),
        400,
        { okText: "Say why the sign-off is rejected." },
      ),
      post(
        "form",
        signoffPath,
        "withdraw",
        () => withIntent("withdraw", { reason: "" }),
        team("engineer"),
        400,
        { okText: "Say why the sign-off is withdrawn." },
      ),
    ],
  },
  "routes/rattle.tsx": {
    probes: [
      noAction("page", (fx) => `${log(fx)}/rattle`),
      get("page", (fx) => `${log(fx)}/rattle`, team("viewer"), 200, { shows: true }),
    ],
  },
  "routes/compare.tsx": {
    probes: [
      noAction("page", (fx) => `${v(fx)}/compare?logs=${pair(fx)}`),
      get("page", (fx) => `${v(fx)}/compare?logs=${pair(fx)}`, team("viewer"), 200, {
        shows: true,
      }),
    ],
  },
  "routes/comparisons.tsx": {
    probes: [
      noAction("page", () => "/comparisons"),
      get("page", () => "/comparisons", team("viewer", false), 200, { shows: true }),
    ],
  },
  "routes/team.tsx": {
    probes: [
      noBody(() => "/team"),
      get("page", () => "/team", team("viewer", false), 200, { shows: true }),
      post(
        "form",
        () => "/team",
        "set-units",
        () => withIntent("set-units", { unit: "furlongs" }),
        team("engineer", false),
        400,
      ),
      // The Logger vocabulary (lib/http/team-ingest.server.ts): refused values change nothing.
      post(
        "form",
        () => "/team",
        "add-channel-name",
        () => withIntent("add-channel-name", { name: "n_kw", role: "wheel" }),
        team("engineer", false),
        400,
      ),
      post(
        "form",
        () => "/team",
        "remove-channel-name",
        () => withIntent("remove-channel-name", { name: "not in the list" }),
        team("engineer", false),
        400,
      ),
      // The trend reference speed (lib/http/team-trend.server.ts): out of range changes nothing.
      post(
        "form",
        () => "/team",
        "set-trend-reference",
        () => withIntent("set-trend-reference", { referenceRpm: "50" }),
        team("engineer", false),
        400,
      ),
      post(
        "form",
        () => "/team",
        "set-strict",
        () => withIntent("set-strict", { strict: "maybe" }),
        team("engineer", false),
        400,
      ),
      // Who approves sign-offs (lib/http/team-signoff.server.ts): admins only; a value that is
      // neither choice changes nothing (400).
      post(
        "form",
        () => "/team",
        "set-signoff-approvers",
        () => withIntent("set-signoff-approvers", { approvers: "everyone" }),
        team("admin", false),
        400,
      ),
      post(
        "form",
        () => "/team",
        "revoke-invitation",
        (fx) => withIntent("revoke-invitation", { invitationId: String(fx.home.invitationId) }),
        team("admin"),
        200,
        { undo: "unrevoke-invitation" },
      ),
      post(
        "form",
        () => "/team",
        "invite",
        () => withIntent("invite", { email: "not an address", role: "viewer" }),
        team("admin", false),
        400,
      ),
    ],
  },
  "routes/team.member.tsx": {
    // The home team's only admin: removing them or changing their role is refused (400).
    probes: [
      noBody((fx) => `/team/members/${fx.home.adminMembershipId}`),
      get("page", (fx) => `/team/members/${fx.home.adminMembershipId}`, team("admin"), 200, {
        shows: true,
      }),
      post(
        "form",
        (fx) => `/team/members/${fx.home.adminMembershipId}`,
        "change-role",
        () => withIntent("change-role", { role: "viewer" }),
        team("admin"),
        400,
      ),
      post(
        "form",
        (fx) => `/team/members/${fx.home.adminMembershipId}`,
        "remove",
        () => withIntent("remove"),
        team("admin"),
        400,
      ),
    ],
  },
  "routes/team.audit.tsx": {
    probes: [
      noAction("page", () => "/team/audit"),
      get("page", () => "/team/audit", team("admin", false), 200, { shows: true }),
    ],
  },
  "routes/account.tsx": {
    probes: [
      noBody(() => "/account"),
      get("page", () => "/account", signedIn),
      // Every caller has one session, so "the others" are none: nothing ends.
      post(
        "form",
        () => "/account",
        "revoke-others",
        () => withIntent("revoke-others"),
        signedIn,
        200,
      ),
      // Another person's session: 404 for everyone, and it stays.
      post(
        "form",
        () => "/account",
        "revoke",
        (fx) => withIntent("revoke", { sessionId: fx.spare.sessionId }),
        signedIn,
        404,
      ),
    ],
  },
  "routes/account.tokens.tsx": {
    probes: [
      noBody(() => "/account/tokens"),
      get("page", () => "/account/tokens", signedIn),
      post(
        "form",
        () => "/account/tokens",
        "create",
        () => withIntent("create", { name: "", expires: "30" }),
        team("viewer", false),
        400,
      ),
      post(
        "form",
        () => "/account/tokens",
        "revoke",
        (fx) => withIntent("revoke", { tokenId: String(fx.spare.apiTokenId) }),
        signedIn,
        404,
      ),
      post(
        "form",
        () => "/account/tokens",
        "revoke-other",
        (fx) => withIntent("revoke-other", { tokenId: String(fx.spare.apiTokenId) }),
        team("admin"),
        200,
        { undo: "unrevoke-spare-token" },
      ),
    ],
  },
  "routes/outbox.tsx": {
    probes: [
      noAction("page", () => "/outbox"),
      get("page", () => "/outbox", team("admin", false), 200, { shows: true }),
    ],
  },
  "routes/not-found.tsx": {
    probes: [
      get("page", () => "/no-such-page", anyone, 404),
      post(
        "form",
        () => "/no-such-page",
        undefined,
        () => ({}),
        anyone,
        404,
      ),
    ],
  },
  "routes/sign-in.tsx": {
    probes: [
      noBody(() => "/sign-in"),
      // A signed-in caller is sent on (302 to /vehicles).
      get("page", () => "/sign-in", anyone, 200, {
        except: { viewer: 302, technician: 302, engineer: 302, admin: 302, otherTeam: 302 },
      }),
      // A wrong password (400); a signed-in caller's page post then meets the loader's redirect
      // (302), the `.data` post runs the action alone. One address per caller: no throttling.
      post(
        "form",
        () => "/sign-in",
        undefined,
        (_, caller) => ({ email: `nobody-${caller}@example.test`, password: "wrong password" }),
        anyone,
        400,
        {
          except: { viewer: 302, technician: 302, engineer: 302, admin: 302, otherTeam: 302 },
          dataExcept: {},
        },
      ),
    ],
  },
  "routes/forgot-password.tsx": {
    probes: [
      noBody(() => "/forgot-password"),
      get("page", () => "/forgot-password", anyone),
      post(
        "form",
        () => "/forgot-password",
        undefined,
        () => ({ email: "not an address" }),
        anyone,
        400,
      ),
    ],
  },
  "routes/reset-password.tsx": {
    probes: [
      noBody(() => "/reset-password/not-a-real-token"),
      get("page", () => "/reset-password/not-a-real-token", anyone),
      // A method no form sends: 405 (issue 12 §7).
      {
        way: "form",
        method: "DELETE",
        path: () => "/reset-password/not-a-real-token",
        form: () => ({}),
        access: anyone,
        ok: 405,
      },
      post(
        "form",
        () => "/reset-password/not-a-real-token",
        undefined,
        () => ({ password: "x", confirm: "x" }),
        anyone,
        410,
      ),
    ],
  },
  "routes/accept-invitation.tsx": {
    probes: [
      noBody(() => "/invitations/not-a-real-token"),
      get("page", () => "/invitations/not-a-real-token", anyone),
      post(
        "form",
        () => "/invitations/not-a-real-token",
        undefined,
        () => ({ password: "x" }),
        anyone,
        410,
      ),
    ],
  },
  "routes/sign-out.ts": {
    // Sent last (it ends the caller's session): everyone is sent to the sign-in page.
    probes: [
      noBody(() => "/sign-out"),
      get("json", () => "/sign-out", anyone, 302),
      post(
        "form",
        () => "/sign-out",
        undefined,
        () => ({}),
        anyone,
        302,
      ),
    ],
  },
  "routes/team-switch.ts": {
    probes: [
      noBody(() => "/team/switch"),
      get("json", () => "/team/switch", anyone, 302),
      post(
        "form",
        () => "/team/switch",
        undefined,
        (fx) => ({ teamId: String(fx.home.teamId) }),
        team("viewer"),
        302,
      ),
    ],
  },
  "routes/vehicle.status.ts": {
    probes: [
      noAction("json", (fx) => `${v(fx)}/status`),
      get("json", (fx) => `${v(fx)}/status`, team("viewer")),
    ],
  },
  // Re-analyse all (issue 17): the vehicle page's panel posts a form; a setting out of range
  // is refused (400) after the role check, so no cell queues anything.
  "routes/vehicle.reanalyse.ts": {
    probes: [
      noBody((fx) => `${v(fx)}/reanalyse`),
      get("json", (fx) => `${v(fx)}/reanalyse`, anyone, 405),
      post(
        "form",
        (fx) => `${v(fx)}/reanalyse`,
        "reanalyse-all",
        () => withIntent("reanalyse-all", { revsPerBlock: "0" }),
        team("engineer"),
        400,
      ),
    ],
  },
  "routes/drive-log.file.ts": {
    probes: [
      noAction("json", (fx) => `${log(fx)}/file`),
      get("json", (fx) => `${log(fx)}/file`, team("viewer")),
    ],
  },
  "routes/drive-log.charts.ts": {
    probes: [
      noAction("json", (fx) => `${log(fx)}/charts.json`),
      get("json", (fx) => `${log(fx)}/charts.json`, team("viewer")),
    ],
  },
  "routes/drive-log.channel-preview.ts": {
    probes: [
      noAction("json", (fx) => `${log(fx)}/channel-preview.json`),
      get("json", (fx) => `${log(fx)}/channel-preview.json`, team("viewer")),
    ],
  },
  "routes/drive-log.result-csv.ts": {
    probes: [
      noAction("json", (fx) => `${log(fx)}/result.csv`),
      get("json", (fx) => `${log(fx)}/result.csv`, team("viewer")),
    ],
  },
  "routes/vehicle.curves.ts": {
    probes: [
      noAction("json", (fx) => `${v(fx)}/curves.json`),
      get("json", (fx) => `${v(fx)}/curves.json?logs=${pair(fx)}`, team("viewer")),
    ],
  },
  "routes/healthz.ts": {
    probes: [noAction("json", () => "/healthz"), get("json", () => "/healthz", anyone)],
  },
  "routes/api.v1.me.ts": {
    probes: [
      ...api((w) => [get(w, () => "/api/v1/me", team("viewer", false), 200, { shows: true })]),
      noAction("api-bearer", () => "/api/v1/me"),
    ],
  },
  "routes/api.v1.vehicles.ts": {
    probes: api((w) => [
      get(w, () => "/api/v1/vehicles", team("viewer", false), 200, { shows: true }),
      {
        way: w,
        method: "POST",
        path: () => "/api/v1/vehicles",
        json: {},
        access: team("engineer", false),
        ok: 400,
      },
    ]),
  },
  "routes/api.v1.vehicle.ts": {
    probes: [
      ...api((w) => [
        get(w, (fx) => `/api/v1/vehicles/${fx.home.vehicleId}`, team("viewer"), 200, {
          shows: true,
        }),
      ]),
      noAction("api-bearer", (fx) => `/api/v1/vehicles/${fx.home.vehicleId}`),
    ],
  },
  "routes/api.v1.vehicle-trend.ts": {
    probes: [
      ...api((w) => [
        get(w, (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/trend`, team("viewer"), 200, {
          okText: "referenceRpm",
        }),
      ]),
      noAction("api-bearer", (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/trend`),
    ],
  },
  "routes/api.v1.vehicle-export.ts": {
    probes: [
      ...api((w) => [
        get(w, (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/export.zip`, team("viewer"), 200, {
          okText: "manifest.json",
        }),
      ]),
      noAction("api-bearer", (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/export.zip`),
    ],
  },
  "routes/api.v1.vehicle-logs.ts": {
    probes: [
      ...api((w) => [get(w, (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/logs`, team("viewer"))]),
      // A multipart body without its boundary: 400 once the role is checked.
      {
        way: "upload-bearer",
        method: "POST",
        path: (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/logs`,
        noBoundary: true,
        access: team("technician"),
        ok: 400,
      },
      // The upload with no file: technicians and up get missing_file (400).
      ...(["upload-bearer", "upload"] as const).map((w) =>
        post(
          w,
          (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/logs`,
          undefined,
          () => ({ condition: "idle-neutral" }),
          team("technician"),
          400,
          {
            okText: "missing_file",
          },
        ),
      ),
    ],
  },
  "routes/api.v1.log.ts": {
    probes: [
      ...api((w) => [
        get(w, (fx) => `/api/v1/logs/${fx.home.logIds[0]}`, team("viewer")),
        // Deleting: a drive log that does not exist, so the role check shows (403 below
        // engineer) and nothing is deleted (404 for engineers and admins). The deletion itself:
        // tests/integration/signoff-rules.test.ts.
        {
          way: w,
          method: "DELETE",
          path: () => "/api/v1/logs/999999999999",
          access: team("engineer"),
          ok: 404,
        },
      ]),
      noAction("api-bearer", (fx) => `/api/v1/logs/${fx.home.logIds[0]}`),
    ],
  },
  "routes/api.v1.log-result.ts": {
    probes: [
      ...api((w) => [get(w, (fx) => `/api/v1/logs/${fx.home.logIds[0]}/result`, team("viewer"))]),
      noAction("api-bearer", (fx) => `/api/v1/logs/${fx.home.logIds[0]}/result`),
    ],
  },
  "routes/api.v1.log-channels.ts": {
    probes: [
      ...api((w) => [get(w, (fx) => `/api/v1/logs/${fx.home.logIds[0]}/channels`, team("viewer"))]),
      noAction("api-bearer", (fx) => `/api/v1/logs/${fx.home.logIds[0]}/channels`),
    ],
  },
  "routes/api.v1.log-shares.ts": {
    probes: api((w) => [
      get(w, (fx) => `/api/v1/logs/${fx.home.logIds[0]}/shares`, team("engineer")),
      // A one-day link: engineers and admins make one (201); it is harmless to the other cells.
      {
        way: w,
        method: "POST",
        path: (fx) => `/api/v1/logs/${fx.home.logIds[0]}/shares`,
        json: { expiresInDays: 1 },
        access: team("engineer"),
        ok: 201,
      },
    ]),
  },
  "routes/api.v1.shares.ts": {
    probes: [
      ...api((w) => [
        get(w, () => "/api/v1/shares", team("engineer", false), 200, { shows: true }),
      ]),
      noAction("api-bearer", () => "/api/v1/shares"),
    ],
  },
  "routes/api.v1.share.ts": {
    probes: api((w) => [
      get(w, (fx) => `/api/v1/shares/${fx.home.shareId}`, team("engineer"), 200, { shows: true }),
      {
        way: w,
        method: "PATCH",
        path: (fx) => `/api/v1/shares/${fx.home.shareId}`,
        json: { expiresInDays: 14 },
        access: team("engineer"),
        ok: 200,
      },
      // A throwaway link: revoking it again answers the same (idempotent).
      {
        way: w,
        method: "DELETE",
        path: (fx) => `/api/v1/shares/${fx.spare.apiShareId}`,
        access: team("engineer"),
        ok: 200,
      },
    ]),
  },
  // Sign-off (issue 16). Reads: viewer and up. Writes: engineer and up, each with a body the
  // schema refuses (400 after the role check), so no cell proposes or decides anything.
  "routes/api.v1.vehicle-signoffs.ts": {
    probes: api((w) => [
      get(w, (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/signoffs`, team("viewer"), 200, {
        okText: '"signoffs"',
      }),
      {
        way: w,
        method: "POST",
        path: (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/signoffs`,
        json: {},
        access: team("engineer"),
        ok: 400,
        okText: "invalid_signoff",
      },
    ]),
  },
  // Re-analyse all (issue 17): queueing is the engineer's (a refused setting, 400, queues
  // nothing); a batch's progress is readable by the team (an unknown batch is 404 for all).
  "routes/api.v1.vehicle-reanalyse.ts": {
    probes: [
      ...api((w) => [
        {
          way: w,
          method: "POST",
          path: (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/reanalyse`,
          json: { revsPerBlock: 0 },
          access: team("engineer"),
          ok: 400,
          okText: "invalid_settings",
        },
      ]),
      get("api-bearer", (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/reanalyse`, anyone, 405),
    ],
  },
  "routes/api.v1.vehicle-reanalyse-batch.ts": {
    probes: [
      ...api((w) => [
        get(
          w,
          (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/reanalyse/0123456789abcdef`,
          team("viewer"),
          404,
          { okText: "No such re-analysis" },
        ),
      ]),
      noAction(
        "api-bearer",
        (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/reanalyse/0123456789abcdef`,
      ),
    ],
  },
  "routes/api.v1.signoffs.ts": {
    probes: [
      ...api((w) => [
        get(w, () => "/api/v1/signoffs", team("viewer", false), 200, { okText: '"signoffs"' }),
        get(w, (fx) => `/api/v1/signoffs?vehicleId=${fx.home.vehicleId}`, team("viewer"), 200, {
          okText: '"signoffs":[{',
        }),
      ]),
      noAction("api-bearer", () => "/api/v1/signoffs"),
    ],
  },
  "routes/api.v1.signoff.ts": {
    probes: [
      ...api((w) => [
        get(w, (fx) => `/api/v1/signoffs/${fx.home.signoffId}`, team("viewer"), 200, {
          shows: true,
        }),
      ]),
      noAction("api-bearer", (fx) => `/api/v1/signoffs/${fx.home.signoffId}`),
    ],
  },
  "routes/api.v1.signoff-report.ts": {
    probes: [
      ...api((w) => [
        get(w, (fx) => `/api/v1/signoffs/${fx.home.signoffId}/report.pdf`, team("viewer"), 200, {
          okText: "%PDF-",
        }),
      ]),
      noAction("api-bearer", (fx) => `/api/v1/signoffs/${fx.home.signoffId}/report.pdf`),
    ],
  },
  "routes/api.v1.signoff-step.ts": {
    probes: [
      ...api((w) =>
        (
          [
            ["approve", { comment: 5 }],
            ["reject", {}],
            ["withdraw", {}],
          ] as const
        ).map(([step, json]): Probe => ({
          way: w,
          method: "POST",
          path: (fx) => `/api/v1/signoffs/${fx.home.signoffId}/${step}`,
          json,
          access: team("engineer"),
          ok: 400,
        })),
      ),
      // Any other step is no endpoint, for everyone; a step is never a GET.
      {
        way: "api-bearer",
        method: "POST",
        path: (fx) => `/api/v1/signoffs/${fx.home.signoffId}/publish`,
        json: {},
        access: anyone,
        ok: 404,
      },
      get("api-bearer", (fx) => `/api/v1/signoffs/${fx.home.signoffId}/approve`, anyone, 405),
    ],
  },
  "routes/api.v1.vehicle-report.ts": {
    probes: [
      ...api((w) => [
        get(w, (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/report.pdf`, team("viewer"), 200, {
          okText: "%PDF-",
        }),
      ]),
      noAction("api-bearer", (fx) => `/api/v1/vehicles/${fx.home.vehicleId}/report.pdf`),
    ],
  },
  "routes/api.v1.not-found.ts": {
    probes: api((w) => [
      get(w, () => "/api/v1/no-such-thing", anyone, 404),
      {
        way: w,
        method: "POST",
        path: () => "/api/v1/no-such-thing",
        json: {},
        access: anyone,
        ok: 404,
      },
    ]),
  },
  "routes/share.tsx": {
    probes: [
      get("share", (fx) => `/s/${fx.home.shareToken}`, share, 200, { shows: true }),
      get("share", (fx) => `/s/${fx.home.shareToken}.data`, share, 200, { shows: true }),
      get("share", (fx) => `/s/${fx.home.compareShareToken}`, share, 200, { shows: true }),
      get("share", (fx) => `/s/${fx.home.signoffShareToken}`, share, 200, { shows: true }),
      get("share", (fx) => `/s/${fx.revokedShareToken}`, share, 410),
      get("share", () => `/s/${"A".repeat(43)}`, share, 404),
      // The shared page has no action.
      {
        way: "share",
        method: "POST",
        path: (fx) => `/s/${fx.home.shareToken}`,
        form: () => ({}),
        access: share,
        ok: 405,
      },
    ],
  },
  "routes/share.charts.ts": {
    probes: [
      noAction("share", (fx) => `/s/${fx.home.shareToken}/charts.json`),
      get("share", (fx) => `/s/${fx.home.shareToken}/charts.json`, share),
      // Another drive log through the link: the home team's unshared one, the other team's.
      get(
        "share",
        (fx) => `/s/${fx.home.shareToken}/charts.json?log=${fx.home.logIds[1]}`,
        share,
        404,
      ),
      get(
        "share",
        (fx) => `/s/${fx.home.shareToken}/charts.json?log=${fx.other.logIds[0]}`,
        share,
        404,
      ),
      get("share", (fx) => `/s/${fx.revokedShareToken}/charts.json`, share, 410),
    ],
  },
  "routes/share.curves.ts": {
    probes: [
      noAction("share", (fx) => `/s/${fx.home.shareToken}/curves.json`),
      get("share", (fx) => `/s/${fx.home.compareShareToken}/curves.json`, share),
      get(
        "share",
        (fx) => `/s/${fx.home.shareToken}/curves.json?logs=${fx.other.logIds[0]}`,
        share,
        404,
      ),
    ],
  },
  "routes/share.file.ts": {
    probes: [
      noAction("share", (fx) => `/s/${fx.home.shareToken}/file`),
      get("share", (fx) => `/s/${fx.home.shareToken}/file`, share),
      get("share", (fx) => `/s/${fx.home.shareToken}/file?log=${fx.other.logIds[0]}`, share, 404),
      // The comparison link does not allow the raw file.
      get("share", (fx) => `/s/${fx.home.compareShareToken}/file`, share, 403),
    ],
  },
  "routes/share.report.ts": {
    probes: [
      noAction("share", (fx) => `/s/${fx.home.signoffShareToken}/report.pdf`),
      get("share", (fx) => `/s/${fx.home.signoffShareToken}/report.pdf`, share, 200, {
        okText: "%PDF-",
      }),
      // A drive log's link has no report; a revoked link is gone.
      get("share", (fx) => `/s/${fx.home.shareToken}/report.pdf`, share, 404),
      get("share", (fx) => `/s/${fx.revokedShareToken}/report.pdf`, share, 410),
    ],
  },
  "routes/drive-log.share.ts": {
    probes: sharePanel(
      (fx) => `${log(fx)}/share`,
      () => ({}),
    ),
  },
  "routes/comparison.share.ts": {
    probes: sharePanel(
      (fx) => `${v(fx)}/compare/share?logs=${pair(fx)}`,
      (fx) => ({ logs: pair(fx) }),
    ),
  },
  "routes/signoff.share.ts": {
    probes: sharePanel(
      (fx) => `${signoffPath(fx)}/share`,
      () => ({}),
    ),
  },
  "routes/comments.ts": {
    probes: [
      noBody((fx) => `${v(fx)}/comments`),
      get(
        "json",
        (fx) => `${v(fx)}/comments?subject=log:${fx.home.logIds[0]}`,
        team("viewer"),
        200,
        { shows: true },
      ),
      post(
        "form",
        (fx) => `${v(fx)}/comments`,
        "post",
        (fx) => withIntent("post", { subject: `log:${fx.home.logIds[0]}`, body: "" }),
        team("technician"),
        400,
      ),
      // Someone else's comment: only an admin deletes it (the author is none of the callers).
      post(
        "form",
        (fx) => `${v(fx)}/comments`,
        "delete",
        (fx) =>
          withIntent("delete", {
            subject: `log:${fx.home.logIds[0]}`,
            commentId: String(fx.spare.commentId),
          }),
        team("admin"),
        200,
      ),
    ],
  },
};

/** The same /api/v1 requests by token and by cookie. */
function api(make: (way: "api-bearer" | "api-cookie") => Probe[]): Probe[] {
  return [...make("api-bearer"), ...make("api-cookie")];
}

/** The share panel's resource route: GET the links, POST create, extend, revoke, email. */
function sharePanel(path: Probe["path"], base: (fx: Fixtures) => Record<string, string>): Probe[] {
  const eng = team("engineer");
  return [
    noBody(path),
    get("json", path, eng, 200, { shows: true }),
    post(
      "form",
      path,
      "create",
      (fx) => ({ ...base(fx), intent: "create", expiresInDays: "0" }),
      eng,
      400,
    ),
    post(
      "form",
      path,
      "extend",
      (fx) => ({
        ...base(fx),
        intent: "extend",
        shareId: String(fx.home.shareId),
        expiresInDays: "14",
      }),
      eng,
      200,
    ),
    post(
      "form",
      path,
      "revoke",
      (fx) => ({ ...base(fx), intent: "revoke", shareId: String(fx.spare.formShareId) }),
      eng,
      200,
    ),
    post(
      "form",
      path,
      "email",
      (fx) => ({ ...base(fx), intent: "email", recipients: "" }),
      eng,
      400,
    ),
  ];
}

/** Whether the route file is a page (has a component): its requests get `.data` twins. */
export const isPage = (file: string) => file.endsWith(".tsx");

/** The `.data` URL React Router's client uses for a path (single fetch; "/" is /_root.data). */
export function dataUrl(path: string): string {
  const url = new URL(path, "http://x");
  url.pathname = url.pathname === "/" ? "/_root.data" : `${url.pathname.replace(/\/$/, "")}.data`;
  return url.pathname + url.search;
}

/** How a caller without a session is turned away, by the way the request came. */
function signInRefusal(way: Way, method: string): Expected {
  if (way === "page" && method === "GET") return "redirect";
  if (way === "page.data") return "data-redirect";
  if (way === "json.data") return "json-refusal";
  return 401;
}

export type Expected = number | "redirect" | "data-redirect" | "json-refusal";

/**
 * The expected answer of one cell. "redirect": 302/303 with a Location to /sign-in;
 * "data-redirect": single fetch's 202 naming /sign-in; "json-refusal": 401, or a redirect to
 * /sign-in with its Location (a resource route the browser may also open as a link), or for a
 * `.data` request single fetch's 202 naming /sign-in.
 */
export function expected(probe: Probe, caller: Caller): Expected {
  const own = probe.except?.[caller];
  if (own !== undefined) return own;
  const a = probe.access;
  if (a.kind === "public" || a.kind === "share") return probe.ok;
  if (caller === "anonymous" || caller === "shareGuest") {
    if (probe.way === "json" && probe.method === "GET") return "json-refusal";
    return signInRefusal(probe.way, probe.method);
  }
  if (a.kind === "signedIn") return probe.ok;
  if (caller === "otherTeam") return a.scoped ? 404 : probe.ok;
  return RANK[caller] >= RANK[a.min] ? probe.ok : 403;
}

/**
 * The `.data` twin of a page's probe or a resource route's GET (single fetch runs the same
 * loader for `/path.data`): redirects become single fetch's 202.
 */
export function dataTwin(probe: Probe): Probe {
  const way: Way =
    probe.way === "page" ? "page.data" : probe.way === "json" ? "json.data" : "form.data";
  const map = (n: number) => (n === 302 ? 202 : n);
  const except =
    probe.dataExcept ??
    (probe.except
      ? Object.fromEntries(Object.entries(probe.except).map(([k, n]) => [k, map(n)]))
      : undefined);
  return { ...probe, way, path: (fx) => dataUrl(probe.path(fx)), ok: map(probe.ok), except };
}

/** Whether an allowed caller's request may change something (then refused cells must not). */
export const writes = (p: Probe) => p.method !== "GET";
