/**
 * The runs list on the live feed (support/fake-socket.ts stands in for socket.io-client; contract:
 * shared/schemas/live.ts): it joins the group's room, shows a changed run and a new one from `group:run`
 * events without reading the list again, and says when the feed is away.
 */
import type { RunSummary } from "@shared/schemas/runs";
import { act, screen, waitFor, within } from "@testing-library/react";
import { afterEach, describe, expect, it } from "vitest";
import { closeLiveClient } from "@/features/live/load-live";
import { installFakeApi } from "./support/fake-api";
import { fakeSockets } from "./support/fake-socket";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { kestrelRuns, RUN_IDS } from "./support/run-fixtures";

afterEach(async () => {
  await closeLiveClient();
  fakeSockets.length = 0;
});

function summary(run: ReturnType<typeof kestrelRuns>[number]): RunSummary {
  const { spec: _spec, events: _events, artifacts: _artifacts, timings: _timings, ...rest } = run;
  return rest;
}

describe("the runs list on the live feed", () => {
  it("joins the group's room and shows changed and new runs from group:run events", async () => {
    const api = installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    renderApp(`/groups/${KESTREL_ID}/runs`);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    expect(screen.getByRole("status", { name: "Updates: connecting…" })).toBeInTheDocument();
    await waitFor(() => expect(fakeSockets).toHaveLength(1));
    const socket = fakeSockets[0]!;
    act(() => socket.serverConnect());
    expect(await screen.findByRole("status", { name: "Updates: live" })).toBeInTheDocument();
    expect(socket.sent("group:join").map((sent) => sent.payload)).toEqual([{ groupId: KESTREL_ID }]);
    const listReads = () => api.requests.filter((r) => r.path === `/api/groups/${KESTREL_ID}/runs`).length;
    const readsBefore = listReads();

    const [running] = kestrelRuns();
    act(() =>
      socket.serverEmit("group:run", {
        groupId: KESTREL_ID,
        run: { ...summary(running!), state: "collecting", stateMessage: "Collecting the result files" },
      }),
    );
    const row = within(table).getByRole("row", { name: /HNCO cc-pVDZ inner region/ });
    await waitFor(() => expect(within(row).getByText("collecting")).toBeInTheDocument());
    expect(within(row).getByText("Collecting the result files")).toBeInTheDocument();

    const fresh: RunSummary = {
      ...summary(running!),
      id: "5a1e0000-0000-4000-8000-000000000009",
      name: "HNCO aug-cc-pVDZ inner region",
      state: "queued",
      stateMessage: null,
      createdAt: "2026-11-30T12:00:00.000Z",
    };
    act(() => socket.serverEmit("group:run", { groupId: KESTREL_ID, run: fresh }));
    await waitFor(() =>
      expect(within(table).getAllByRole("row")[1]).toHaveAccessibleName(/HNCO aug-cc-pVDZ inner region/),
    );
    // Another group's event changes nothing here.
    act(() =>
      socket.serverEmit("group:run", {
        groupId: "7c2e4a91-3b5f-4d6a-8e02-1f9b3c5d7e02",
        run: { ...fresh, id: RUN_IDS.cancelled, name: "Not of this group" },
      }),
    );
    expect(within(table).queryByText("Not of this group")).not.toBeInTheDocument();
    expect(listReads()).toBe(readsBefore);

    act(() => socket.serverDisconnect());
    expect(await screen.findByRole("status", { name: "Updates: reconnecting…" })).toBeInTheDocument();
    act(() => socket.serverConnect());
    expect(await screen.findByRole("status", { name: "Updates: live" })).toBeInTheDocument();
    // The room is joined again on the new connection.
    expect(socket.sent("group:join")).toHaveLength(2);
  });
});
