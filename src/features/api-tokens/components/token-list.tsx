import type { ApiToken } from "@shared/schemas";
import { useQuery } from "@tanstack/react-query";
import { KeySquare } from "lucide-react";
import { useState } from "react";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { ConfirmDialog } from "@/components/ui/dialog";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { TableSkeleton } from "@/components/ui/skeleton";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDate, formatDateTime, isPast } from "@/lib/format";
import { tokenQueries } from "../api/token-queries";
import { useRevokeApiToken } from "../hooks/use-token-mutations";

function ExpiryCell({ token }: { token: ApiToken }) {
  if (!token.expiresAt) return <span className="text-ink-500">Never</span>;
  if (isPast(token.expiresAt)) return <Badge tone="ember">Expired {formatDate(token.expiresAt)}</Badge>;
  return <>{formatDate(token.expiresAt)}</>;
}

export function TokenList() {
  const tokens = useQuery(tokenQueries.list());
  const revoke = useRevokeApiToken();
  const [revokingId, setRevokingId] = useState<string | null>(null);

  if (tokens.isPending) return <TableSkeleton label="Loading API tokens" columns={5} rows={3} />;
  if (tokens.isError) {
    return <ErrorState error={tokens.error} onRetry={() => tokens.refetch()} retrying={tokens.isFetching} />;
  }

  const list = tokens.data.tokens;
  const revoking = list.find((token) => token.id === revokingId) ?? null;

  function closeRevoke() {
    setRevokingId(null);
    revoke.reset();
  }

  if (list.length === 0) {
    return (
      <EmptyState icon={<KeySquare className="size-5" aria-hidden="true" />} title="No API tokens">
        Create a token for each script or machine that talks to Sigmaflow, so you can revoke one without
        disturbing the others.
      </EmptyState>
    );
  }

  return (
    <>
      <Table caption="Your API tokens">
        <THead>
          <tr>
            <TH>Name</TH>
            <TH>Prefix</TH>
            <TH>Created</TH>
            <TH>Last used</TH>
            <TH>Expires</TH>
            <TH>
              <span className="sr-only">Actions</span>
            </TH>
          </tr>
        </THead>
        <TBody>
          {list.map((token) => (
            <TR key={token.id}>
              <TD className="font-medium whitespace-nowrap text-ink-900">{token.name}</TD>
              <TD>
                <code className="rounded bg-ink-50 px-1.5 py-0.5 font-mono text-xs text-ink-700">
                  {token.prefix}…
                </code>
              </TD>
              <TD className="whitespace-nowrap text-ink-600">{formatDate(token.createdAt)}</TD>
              <TD className="whitespace-nowrap text-ink-600">
                {token.lastUsedAt ? formatDateTime(token.lastUsedAt) : "Never"}
              </TD>
              <TD className="whitespace-nowrap text-ink-600">
                <ExpiryCell token={token} />
              </TD>
              <TD className="text-right">
                <Button
                  variant="ghost-danger"
                  size="sm"
                  aria-label={`Revoke ${token.name}`}
                  onClick={() => setRevokingId(token.id)}
                >
                  Revoke
                </Button>
              </TD>
            </TR>
          ))}
        </TBody>
      </Table>
      <ConfirmDialog
        open={revoking !== null}
        title={revoking ? `Revoke “${revoking.name}”?` : "Revoke token?"}
        confirmLabel="Revoke token"
        pending={revoke.isPending}
        error={revoke.error}
        onClose={closeRevoke}
        onConfirm={() => {
          if (revoking) revoke.mutate(revoking.id, { onSuccess: closeRevoke });
        }}
      >
        <p>Scripts using this token are refused from now on. This cannot be undone.</p>
      </ConfirmDialog>
    </>
  );
}
