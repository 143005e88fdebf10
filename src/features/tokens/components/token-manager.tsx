import { useState } from "react";
import type { ApiTokenScope, CreatedApiToken } from "@shared/schemas/tokens";
import { ApiError, getErrorMessage } from "@/lib/api-client";
import { formatUtc } from "@/lib/format";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { CopyButton } from "@/features/catalogue/components/copy-button";
import { useCreateToken, useRevokeToken, useTokens } from "../api/tokens";

const scopeWords: Record<ApiTokenScope, string> = { read: "read: list and download", upload: "upload: also send files" };

/** Make, list and revoke personal API tokens. A new token's secret is shown here once. */
export function TokenManager() {
  const { data, isPending, error } = useTokens(true);
  const create = useCreateToken();
  const revoke = useRevokeToken();
  const [name, setName] = useState("");
  const [scope, setScope] = useState<ApiTokenScope>("read");
  const [days, setDays] = useState("90");
  const [made, setMade] = useState<CreatedApiToken | null>(null);
  const fields = create.error instanceof ApiError ? create.error.fields : {};

  return (
    <div className="space-y-4">
      <form
        className="grid gap-3 sm:grid-cols-[1fr_14rem_9rem_auto] sm:items-end"
        onSubmit={(e) => {
          e.preventDefault();
          create.mutate(
            { name: name.trim(), scope, expiresInDays: days ? Number(days) : undefined },
            {
              onSuccess: (t) => {
                setMade(t);
                setName("");
              },
            },
          );
        }}
      >
        <TextField label="Token name" placeholder="e.g. nightly download script" value={name} maxLength={100} error={fields.name?.[0]} onChange={(e) => setName(e.target.value)} />
        <SelectField label="Scope" value={scope} error={fields.scope?.[0]} onChange={(e) => setScope(e.target.value as ApiTokenScope)} options={[{ value: "read", label: scopeWords.read }, { value: "upload", label: scopeWords.upload }]} />
        <SelectField
          label="Valid for"
          value={days}
          error={fields.expiresInDays?.[0]}
          onChange={(e) => setDays(e.target.value)}
          options={[
            { value: "30", label: "30 days" },
            { value: "90", label: "90 days" },
            { value: "365", label: "1 year" },
            { value: "", label: "No end date" },
          ]}
        />
        <Button type="submit" busy={create.isPending}>
          Make token
        </Button>
      </form>
      {create.error && !Object.keys(fields).length ? <Alert tone="attention">{getErrorMessage(create.error)}</Alert> : null}
      {made ? (
        <Alert tone="success" title={`Token “${made.name}” made — copy it now`}>
          <p className="mb-2">This is the only time it is shown. Keep it like a password; revoke it here if it leaks.</p>
          <div className="flex flex-wrap items-center gap-2">
            <code className="break-all rounded border border-line bg-surface px-2 py-1 text-sm" data-testid="new-token">
              {made.token}
            </code>
            <CopyButton text={made.token} what="Token" />
            <Button variant="ghost" size="sm" onClick={() => setMade(null)}>
              I have stored it
            </Button>
          </div>
        </Alert>
      ) : null}
      {isPending ? null : error ? (
        <Alert tone="attention">{getErrorMessage(error)}</Alert>
      ) : data.items.length === 0 ? (
        <p className="text-sm text-muted">You have no tokens yet. Make one above for each script, so you can revoke them one by one.</p>
      ) : (
        <Table caption="Your API tokens">
          <thead>
            <tr>
              <Th>Name</Th>
              <Th>Scope</Th>
              <Th>Starts with</Th>
              <Th>Made (UTC)</Th>
              <Th>Last used (UTC)</Th>
              <Th>Ends (UTC)</Th>
              <Th>
                <span className="sr-only">Actions</span>
              </Th>
            </tr>
          </thead>
          <tbody>
            {data.items.map((t) => (
              <Tr key={t.id} className={t.revokedAt ? "text-muted" : undefined}>
                <Td>{t.name}</Td>
                <Td>{t.scope}</Td>
                <Td>
                  <code className="text-sm">{t.prefix}…</code>
                </Td>
                <Td className="num whitespace-nowrap">{formatUtc(t.createdAt)}</Td>
                <Td className="num whitespace-nowrap">{t.lastUsedAt ? formatUtc(t.lastUsedAt) : "never"}</Td>
                <Td className="num whitespace-nowrap">{t.revokedAt ? `revoked ${formatUtc(t.revokedAt)}` : t.expiresAt ? formatUtc(t.expiresAt) : "no end date"}</Td>
                <Td>
                  {t.revokedAt ? null : (
                    <Button
                      variant="ghost"
                      size="sm"
                      busy={revoke.isPending && revoke.variables === t.id}
                      onClick={() => {
                        if (window.confirm(`Revoke “${t.name}”? Scripts using it stop working at once.`)) revoke.mutate(t.id);
                      }}
                    >
                      Revoke
                    </Button>
                  )}
                </Td>
              </Tr>
            ))}
          </tbody>
        </Table>
      )}
    </div>
  );
}
