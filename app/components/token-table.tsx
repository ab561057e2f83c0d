/** The API-token page's parts: the new token, shown once, and a table of tokens to revoke. */
import { IntentButton } from "./form";
import { TableHead, tableClass, tdClass, When } from "./page";
import { ScrollArea } from "./scroll-area";

/** A token just made: shown this once, to copy. */
export function NewToken({
  created,
}: {
  created: { name: string; teamName: string; token: string };
}) {
  return (
    <section
      aria-labelledby="new-token-title"
      className="rounded-lg border border-indigo-200 bg-indigo-50 p-6"
    >
      <h2 id="new-token-title" className="font-semibold text-indigo-950">
        Copy your new token now
      </h2>
      <p className="mt-1 text-sm text-indigo-900">
        “{created.name}” for {created.teamName}. It is shown only this once; Twistlog keeps only a
        fingerprint of it.
      </p>
      <output
        aria-label="New API token"
        className="mt-3 block break-all rounded-md border border-indigo-200 bg-white px-3 py-2 font-mono text-sm"
        data-token
      >
        {created.token}
      </output>
    </section>
  );
}

/** Tokens with their owner or team (`whoLabel`), expiry and last use; each revoked by `intent`. */
export function TokenTable({
  rows,
  whoLabel,
  label,
  intent,
}: {
  rows: {
    id: number;
    name: string;
    prefix: string;
    who: string;
    expiresAt: Date | null;
    lastUsedAt: Date | null;
  }[];
  whoLabel: string;
  label: string;
  intent: string;
}) {
  return (
    <ScrollArea label={label}>
      <table className={tableClass}>
        <TableHead
          columns={["Name", "Starts with", whoLabel, "Expires", "Last used"]}
          action="Revoke"
        />
        <tbody>
          {rows.map((t) => (
            <tr key={t.id}>
              <td className={tdClass}>{t.name}</td>
              <td className={`${tdClass} font-mono`}>{t.prefix}…</td>
              <td className={tdClass}>{t.who}</td>
              <td className={tdClass}>{t.expiresAt ? <When date={t.expiresAt} /> : "never"}</td>
              <td className={tdClass}>{t.lastUsedAt ? <When date={t.lastUsedAt} /> : "not yet"}</td>
              <td className={`${tdClass} text-right`}>
                <IntentButton intent={intent} fields={{ tokenId: t.id }} tone="danger">
                  Revoke<span className="sr-only"> {t.name}</span>
                </IntentButton>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </ScrollArea>
  );
}
