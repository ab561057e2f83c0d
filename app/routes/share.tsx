import { isRouteErrorResponse, useLoaderData, useParams, useRouteError } from "react-router";
import { AnalysisDetails } from "~/components/analysis-details";
import { AnalysisSummaryView } from "~/components/analysis-summary";
import { DriveLogCharts } from "~/components/charts/drive-log-charts";
import { ComparisonView } from "~/components/comparison-view";
import { LogoMark } from "~/components/logo-mark";
import { SharedSignoff } from "~/components/signoff-shared";
import { mainProps, SkipLink } from "~/components/skip-link";
import { Card, InlineTerm, When } from "~/components/page";
import { conditionLabels, gearLabel } from "~/lib/domain/drive-log-terms";
import { countShareView } from "~/lib/data/shares.server";
import { requireShareForPage, shareHeaders, sharedPageData } from "~/lib/http/share-link.server";
import { NOT_FOUND_MESSAGE, UNAVAILABLE_MESSAGE } from "~/lib/domain/share-schema";
import type { Route } from "./+types/share";
import { pageRoute } from "~/lib/http/edge.server";

/**
 * /s/:token — the read-only page of a share link, without sign-in (issue 7). Its own frame: no
 * app header, no link to anything else of the team. A revoked or expired link is a 410 page and
 * an unknown or altered token a 404 page, neither with any of the shared data.
 */
export const meta = ({ data }: Route.MetaArgs) => [
  {
    title: data
      ? `${data.kind === "comparison" ? "Shared comparison" : data.kind === "signoff" ? "Shared sign-off" : "Shared drive log"} · ${data.vehicle.identifier} · Twistlog`
      : "Share link · Twistlog",
  },
  { name: "robots", content: "noindex, nofollow" },
  { name: "referrer", content: "no-referrer" },
];

export const headers: Route.HeadersFunction = () => shareHeaders;

export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const active = await requireShareForPage(params.token);
  const page = await sharedPageData(active);
  // One view per opening of the page (the time only, no personal data); a HEAD is not a view.
  if (request.method === "GET") await countShareView(active.share.id);
  return page;
});

export default function SharedPage() {
  const page = useLoaderData<typeof loader>();
  const { token } = useParams();
  const base = `/s/${token}`;
  return (
    <ShareFrame>
      <header className="space-y-3">
        <p className="text-sm text-neutral-600">
          Shared by <span className="font-medium text-neutral-900">{page.sharedBy}</span> of{" "}
          {page.teamName} on <When date={page.sharedAt} />. Read only; the link works until{" "}
          <When date={page.expiresAt} />.
        </p>
        {page.note ? (
          <blockquote
            aria-label="Note from the sharer"
            className="max-w-3xl border-l-4 border-indigo-300 bg-white px-4 py-2 text-neutral-800 whitespace-pre-line"
          >
            {page.note}
          </blockquote>
        ) : null}
      </header>

      <Card title="Vehicle" id="vehicle">
        <dl className="grid gap-x-8 gap-y-3 text-sm sm:grid-cols-2 lg:grid-cols-4">
          <Item term="Vehicle">
            {page.vehicle.name} ({page.vehicle.identifier})
          </Item>
          <Item term="Engine">
            {page.vehicle.engine}; firing order {page.vehicle.firingOrder}
          </Item>
          <Item term="Transmission">{page.vehicle.transmission}</Item>
          {/* The vehicle's current damper; each drive log below names the one it was recorded with. */}
          <Item term="Vehicle's fitted damper">
            {page.vehicle.damper}, variant {page.vehicle.damperVariant}
          </Item>
        </dl>
      </Card>

      {page.kind === "signoff" && page.signoff ? (
        <SharedSignoff signoff={page.signoff} reportHref={`${base}/report.pdf`} />
      ) : null}

      {page.kind === "comparison" && page.comparison ? (
        <ComparisonView
          vehicle={page.vehicle}
          logs={page.comparison.logs}
          referenceNote={page.comparison.referenceNote}
          comparison={page.comparison.result}
          curvesUrl={`${base}/curves.json?logs=${page.comparison.logs.map((l) => l.id).join(",")}`}
        />
      ) : null}

      {page.logs.map((log) => (
        <section
          key={log.id}
          aria-labelledby={`log-${log.id}-title`}
          className="space-y-4"
          data-shared-log={log.id}
        >
          <div>
            <Heading
              level={page.kind === "comparison" ? 2 : 1}
              id={`log-${log.id}-title`}
              className="text-xl font-semibold break-all"
            >
              {page.kind === "comparison" ? "Drive log: " : ""}
              {log.fileName}
            </Heading>
            <dl className="mt-2 flex flex-wrap gap-x-6 gap-y-1 text-sm">
              <InlineTerm term="Condition">{conditionLabels[log.condition]}</InlineTerm>
              <InlineTerm term="Gear">{gearLabel(log.gear)}</InlineTerm>
              <InlineTerm term="Damper in this drive log">
                <span data-log-damper>
                  {page.vehicle.damper}, variant {log.damperVariant}
                </span>
              </InlineTerm>
              <InlineTerm term="Test date">
                {log.testDate ? <When date={log.testDate} dateOnly /> : "—"}
              </InlineTerm>
              {log.analysis ? (
                <InlineTerm term="Analysis">
                  version {log.analysis.version}, made <When date={log.analysis.createdAt} />
                </InlineTerm>
              ) : null}
            </dl>
            {page.allowRawDownload ? (
              <p className="mt-2 text-sm">
                <a
                  href={`${base}/file${page.kind === "comparison" ? `?log=${log.id}` : ""}`}
                  rel="noreferrer"
                  download
                  className="text-indigo-700 underline underline-offset-4"
                >
                  Download the raw file<span className="sr-only"> {log.fileName}</span>
                </a>
              </p>
            ) : null}
          </div>
          {log.summary ? (
            <>
              <AnalysisSummaryView s={log.summary} />
              {page.kind === "log" ? (
                <DriveLogCharts
                  chartsUrl={`${base}/charts.json`}
                  exportContext={{
                    vehicle: `${page.vehicle.name} (${page.vehicle.identifier})`,
                    driveLog: log.fileName,
                  }}
                />
              ) : null}
              <AnalysisDetails s={log.summary} />
            </>
          ) : (
            <p className="rounded-md border border-dashed border-neutral-300 px-4 py-6 text-sm text-neutral-600">
              {log.status === "failed"
                ? "This drive log could not be analysed, so there are no results to show."
                : "The analysis of this drive log has not finished yet: open the link again in a few minutes."}
            </p>
          )}
        </section>
      ))}
    </ShareFrame>
  );
}

/** The page's own frame: the product's name, the content, the cautions. Nothing to navigate to. */
function ShareFrame({ children }: { children: React.ReactNode }) {
  return (
    <div className="flex min-h-full flex-col">
      <SkipLink />
      <header className="border-b border-neutral-200 bg-white">
        <div className="mx-auto flex max-w-[1400px] flex-wrap items-center gap-2 px-4 py-4 sm:px-6">
          <LogoMark />
          <span className="text-lg font-semibold tracking-tight">Twistlog</span>
          <span className="ml-3 text-sm text-neutral-500">Shared results, read only</span>
        </div>
      </header>
      <main
        {...mainProps}
        className="mx-auto w-full max-w-[1400px] flex-1 space-y-6 px-4 py-6 outline-none sm:px-6 sm:py-10"
      >
        {children}
      </main>
      <footer className="border-t border-neutral-200 bg-white">
        <p className="mx-auto max-w-[1400px] px-4 py-4 text-xs text-neutral-500 sm:px-6">
          Road tests belong on a proving ground or closed course, driven by trained staff under
          local rules; never operate Twistlog while driving. Keep sensor wiring clear of rotating
          parts. Damper and clutch work is for licensed workshops. Local codes and licensed practice
          come first.
        </p>
      </footer>
    </div>
  );
}

function Heading({
  level,
  ...props
}: {
  level: 1 | 2;
  id: string;
  className: string;
  children: React.ReactNode;
}) {
  return level === 1 ? <h1 {...props} /> : <h2 {...props} />;
}

function Item({ term, children }: { term: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-neutral-500">{term}</dt>
      <dd className="mt-0.5 font-medium text-neutral-900">{children}</dd>
    </div>
  );
}

/** 410: the link existed and is gone (revoked or expired); 404: no such link. No data either way. */
export function ErrorBoundary() {
  const error = useRouteError();
  const status = isRouteErrorResponse(error) ? error.status : 500;
  const text =
    status === 410
      ? {
          title: UNAVAILABLE_MESSAGE,
          hint: "It has expired or the person who shared it has revoked it. Ask them for a new link if you still need the results.",
        }
      : status === 404
        ? {
            title: NOT_FOUND_MESSAGE,
            hint: "Check that the whole link was copied: share links are long, and a missing character makes them unknown.",
          }
        : {
            title: "Something went wrong",
            hint: "The shared page could not be shown. Try again in a minute.",
          };
  return (
    <ShareFrame>
      <div role="alert" className="mx-auto max-w-2xl py-12" data-share-error={status}>
        <p className="text-sm font-semibold text-neutral-500">Error {status}</p>
        <h1 className="mt-2 text-2xl font-semibold">{text.title}</h1>
        <p className="mt-3 text-neutral-700">{text.hint}</p>
      </div>
    </ShareFrame>
  );
}
