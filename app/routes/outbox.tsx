import { useLoaderData } from "react-router";
import { EmptyState, PageHeader, When } from "~/components/page";
import { getEnv } from "~/lib/infra/env.server";
import { readStoredMail, type StoredMail } from "~/lib/infra/fake-smtp.server";
import { usingFakeMail } from "~/lib/infra/mail.server";
import { teamData } from "~/lib/data/team-data.server";
import type { Route } from "./+types/outbox";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";

export const meta = () => [{ title: "Outbox · Twistlog" }];

/**
 * The local fake mail server's messages, for admins, only while it is in use (SMTP_URL unset):
 * on a laptop nobody receives real e-mail, so invitation and reset links are read here.
 */
export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "admin");
  if (!usingFakeMail())
    throw new NotFound("Mail goes to a real provider here, so there is no local outbox.");
  const members = new Set((await teamData(team.id).members()).map((m) => m.email.toLowerCase()));
  return { messages: visibleMail(await readStoredMail(getEnv().MAIL_DIR, 500), team.id, members) };
});

const PER_PAGE = 50;

/**
 * What an admin of `teamId` may read: the mail this team sent (its invitations, shares and
 * mentions, whoever they went to), and nothing of another team's. A password-reset link belongs
 * to its addressee alone — showing it would let an admin take over the account — so a reset
 * appears only when it went to a member of this team, and then without its text.
 */
function visibleMail(all: StoredMail[], teamId: number, members: Set<string>) {
  return all
    .flatMap((m) => {
      if (m.kind === "reset") {
        return members.has(m.to.toLowerCase()) ? [{ ...m, text: "", redacted: true }] : [];
      }
      return m.teamId === teamId ? [{ ...m, redacted: false }] : [];
    })
    .slice(0, PER_PAGE);
}

export default function Outbox() {
  const { messages } = useLoaderData<typeof loader>();
  return (
    <div className="max-w-4xl">
      <PageHeader
        title="Outbox"
        lead="No real e-mail leaves this installation: the local mail server keeps the messages here instead. You see the mail this team sent; password-reset links only their addressees see. Newest first."
      />
      {messages.length === 0 ? (
        <EmptyState>
          No messages yet. Invite a colleague on the Team page or ask for a password reset, and the
          e-mail appears here.
        </EmptyState>
      ) : (
        <ol className="space-y-4">
          {messages.map((m) => (
            <li key={m.id}>
              <article
                aria-labelledby={`mail-${m.id}`}
                className="rounded-lg border border-neutral-200 bg-white p-5"
              >
                <h2 id={`mail-${m.id}`} className="font-semibold">
                  {m.subject}
                </h2>
                <p className="mt-1 text-xs text-neutral-500">
                  To {m.to} · <When date={m.date} />
                </p>
                {m.redacted ? (
                  <p className="mt-3 text-sm text-neutral-600">
                    A password-reset link was sent to {m.to}. Only its addressee can use it, so it
                    is not shown here.
                  </p>
                ) : (
                  <div className="mt-3 whitespace-pre-wrap break-words text-sm text-neutral-800">
                    <Linkified text={m.text} />
                  </div>
                )}
              </article>
            </li>
          ))}
        </ol>
      )}
    </div>
  );
}

/** Plain text with its http(s) links made clickable (nothing else is interpreted). */
function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/\S+)/g);
  return (
    <>
      {parts.map((part, i) =>
        /^https?:\/\//.test(part) ? (
          <a key={i} href={part} className="text-indigo-700 underline underline-offset-4">
            {part}
          </a>
        ) : (
          <span key={i}>{part}</span>
        ),
      )}
    </>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
