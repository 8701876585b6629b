import { useState, type FormEvent } from "react";
import { CreateShareLinkBody, SHARE_LINK_DEFAULT_DAYS, type Bundle, type CreatedShareLink } from "@shared/schemas/bundles";
import { Alert, ErrorNotice } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button, buttonClasses } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { TextField } from "@/components/ui/field";
import { useCreateShareLink, useRevokeShareLink } from "../api";
import { dateTimeText, LINK_STATUS_WORDS, sizeText } from "../utils";

/** The link URL right after it was made: shown this once, with a copy button. */
function NewLink({ link }: { link: CreatedShareLink }) {
  const [copied, setCopied] = useState<"no" | "yes" | "failed">("no");
  const copy = async () => {
    try {
      await navigator.clipboard.writeText(link.url);
      setCopied("yes");
    } catch {
      setCopied("failed");
    }
  };
  return (
    <Alert tone="ok" role="status" title="Share link made">
      <div className="space-y-2">
        <div className="flex flex-wrap items-center gap-2">
          <input
            readOnly
            value={link.url}
            aria-label="Share link address"
            className="min-w-0 flex-1 rounded-lg border border-line-strong bg-surface px-3 py-1.5 font-mono text-xs"
            onFocus={(e) => e.currentTarget.select()}
          />
          <Button size="sm" variant="secondary" onClick={copy}>
            {copied === "yes" ? "Copied" : "Copy link"}
          </Button>
        </div>
        <p className="text-xs">
          This address is shown only now: Thetafold keeps just a fingerprint of it. Copy it before you leave the page.
          {copied === "failed" && " The browser did not allow copying; select the address and copy it by hand."}
        </p>
        {link.emailTo && link.emailed && <p className="text-xs">Sent by e-mail to {link.emailTo}.</p>}
        {link.emailError && <p className="text-xs font-medium text-danger">{link.emailError}</p>}
      </div>
    </Alert>
  );
}

function ShareLinks({ labId, bundle }: { labId: string; bundle: Bundle }) {
  const [days, setDays] = useState(String(SHARE_LINK_DEFAULT_DAYS));
  const [max, setMax] = useState("");
  const [email, setEmail] = useState("");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const create = useCreateShareLink(labId, bundle.id);
  const revoke = useRevokeShareLink(labId, bundle.id);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = CreateShareLinkBody.safeParse({
      expiresInDays: days.trim() === "" ? undefined : Number(days),
      maxDownloads: max.trim() === "" ? null : Number(max),
      emailTo: email.trim() === "" ? null : email.trim(),
    });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    create.mutate(parsed.data, { onSuccess: () => setEmail("") });
  };

  return (
    <div className="space-y-3">
      <h3 className="text-sm font-semibold text-ink">Share links</h3>
      {bundle.links.length === 0 ? (
        <p className="text-sm text-ink-muted">No share links yet. A link lets someone without an account download this bundle.</p>
      ) : (
        <ul className="divide-y divide-line rounded-lg border border-line text-sm">
          {bundle.links.map((l) => (
            <li key={l.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2">
              <div className="min-w-0 space-y-0.5">
                <div className="flex flex-wrap items-center gap-2">
                  <Badge tone={l.status === "active" ? "ok" : "neutral"}>{LINK_STATUS_WORDS[l.status]}</Badge>
                  <span className="text-ink">
                    {l.downloadCount} download{l.downloadCount === 1 ? "" : "s"}
                    {l.maxDownloads != null ? ` of ${l.maxDownloads}` : ""}
                  </span>
                </div>
                <p className="text-xs text-ink-muted">
                  Made {dateTimeText(l.createdAt)}
                  {l.createdByName ? ` by ${l.createdByName}` : ""} · {l.revokedAt ? `revoked ${dateTimeText(l.revokedAt)}` : `expires ${dateTimeText(l.expiresAt)}`}
                  {l.emailTo ? ` · sent to ${l.emailTo}` : ""}
                </p>
              </div>
              {l.status === "active" && (
                <Button size="sm" variant="danger" pending={revoke.isPending && revoke.variables === l.id} onClick={() => revoke.mutate(l.id)}>
                  Revoke
                </Button>
              )}
            </li>
          ))}
        </ul>
      )}
      {revoke.isError && <ErrorNotice error={revoke.error} />}
      <form aria-label={`New share link for ${bundle.name}`} onSubmit={submit} className="grid gap-3 sm:grid-cols-3">
        <TextField label="Expires after (days)" name="expiresInDays" inputMode="numeric" value={days} onChange={(e) => setDays(e.target.value)} error={errors.expiresInDays} />
        <TextField
          label="Download limit"
          name="maxDownloads"
          inputMode="numeric"
          value={max}
          onChange={(e) => setMax(e.target.value)}
          hint="Empty: no limit"
          error={errors.maxDownloads}
        />
        <TextField label="E-mail it to (optional)" name="emailTo" type="email" value={email} onChange={(e) => setEmail(e.target.value)} error={errors.emailTo} />
        <div className="sm:col-span-3">
          <Button type="submit" variant="secondary" pending={create.isPending}>
            Make share link
          </Button>
        </div>
      </form>
      {create.isError && <ErrorNotice error={create.error} title="No link was made" />}
      {create.isSuccess && <NewLink link={create.data} />}
    </div>
  );
}

/** One bundle: what is in it, who made it and when, its download, and (for researchers and leads) its share links. */
export function BundleCard({ labId, bundle, canShare }: { labId: string; bundle: Bundle; canShare: boolean }) {
  const headingId = `bundle-${bundle.id}`;
  return (
    <Card>
      <CardHeader
        id={headingId}
        title={bundle.name}
        description={`${dateTimeText(bundle.createdAt)}${bundle.createdBy ? ` · ${bundle.createdBy.displayName}` : ""} · ${sizeText(bundle.sizeBytes)}`}
        actions={
          <a className={buttonClasses("primary", "sm")} href={bundle.downloadUrl} download aria-label={`Download ${bundle.name}`}>
            Download zip
          </a>
        }
      />
      <CardBody className="space-y-4">
        <p className="text-sm text-ink">
          {bundle.counts.samples} sample{bundle.counts.samples === 1 ? "" : "s"}, {bundle.counts.runs} run{bundle.counts.runs === 1 ? "" : "s"},{" "}
          {bundle.counts.fits} approved fit{bundle.counts.fits === 1 ? "" : "s"}
          {bundle.selection.comparisonName ? `, comparison “${bundle.selection.comparisonName}”` : ""}.
        </p>
        <details className="text-sm">
          <summary className="cursor-pointer text-ink">Contents ({bundle.contents.length} files)</summary>
          <ul className="mt-2 max-h-56 overflow-y-auto font-mono text-xs text-ink-muted">
            {bundle.contents.map((c) => (
              <li key={c.path} className="flex justify-between gap-4">
                <span className="truncate">{c.path}</span>
                <span className="shrink-0">{sizeText(c.bytes)}</span>
              </li>
            ))}
          </ul>
          <p className="mt-2 text-xs break-all text-ink-muted">
            SHA-256 of the zip: <span className="font-mono">{bundle.fileSha256}</span> (checked again on every download)
          </p>
        </details>
        {canShare && <ShareLinks labId={labId} bundle={bundle} />}
      </CardBody>
    </Card>
  );
}
