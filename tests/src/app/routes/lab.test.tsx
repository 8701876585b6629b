// @vitest-environment jsdom
import { afterEach, describe, expect, it } from "vitest";
import { cleanup, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import type { Role } from "@shared/schemas/auth";
import { errorReply, reply, stubFetch, type StubHandler } from "../../../helpers/fetch-stub";
import { memberFixture, meFixture, renderApp, TEST_LAB } from "../../../helpers/render-app";

const LAB_PAGE = `/labs/${TEST_LAB.labId}/lab`;
const MEMBERS = [memberFixture("lead", "Ada Lindqvist"), memberFixture("researcher", "Bo Ferreira"), memberFixture("guest", "Chen Okafor")];

function labApi(role: Role, extra: Record<string, StubHandler> = {}) {
  return stubFetch({
    "GET /api/setup": reply(200, { needsSetup: false, fakeMail: true }),
    "GET /api/me": reply(200, meFixture(role)),
    "GET /api/labs/:labId/members": reply(200, MEMBERS),
    "GET /api/labs/:labId/invitations": reply(200, []),
    "GET /api/labs/:labId/audit": reply(200, []),
    ...extra,
  });
}

let stub: ReturnType<typeof stubFetch>;
afterEach(() => {
  cleanup();
  stub.restore();
});

describe("lab page", () => {
  it("shows a guest the members with their roles but no invite form, role pickers or remove buttons", async () => {
    stub = labApi("guest");
    renderApp(LAB_PAGE);

    const table = await screen.findByRole("table", { name: "Members of this lab and their roles" });
    expect(within(table).getByText("Ada Lindqvist")).toBeTruthy();
    expect(within(table).getByText("Researcher")).toBeTruthy();
    expect(screen.queryByRole("form", { name: "Invite someone" })).toBeNull();
    expect(screen.queryByRole("combobox", { name: /Role of/ })).toBeNull();
    expect(screen.queryByRole("button", { name: /Remove/ })).toBeNull();
    expect(screen.queryByRole("heading", { name: "Audit log" })).toBeNull();
    // Lead-only reads are not even asked for.
    expect(stub.callsTo("GET /api/labs/:labId/invitations")).toHaveLength(0);
    expect(stub.callsTo("GET /api/labs/:labId/audit")).toHaveLength(0);
  });

  it("gives a lead the invite form, checks the address with the shared schema, and sends e-mail and role", async () => {
    stub = labApi("lead", {
      "POST /api/labs/:labId/invitations": (call) =>
        reply(201, {
          id: "inv-1",
          email: (call.body as { email: string }).email,
          role: (call.body as { role: Role }).role,
          createdAt: "2026-12-01T10:00:00.000Z",
          expiresAt: "2026-12-08T10:00:00.000Z",
          acceptedAt: null,
        }),
    });
    const user = userEvent.setup();
    renderApp(LAB_PAGE);

    const form = await screen.findByRole("form", { name: "Invite someone" });
    expect(screen.getByRole("heading", { name: "Audit log" })).toBeTruthy();
    await user.type(within(form).getByLabelText("E-mail address"), "not an address");
    await user.click(within(form).getByRole("button", { name: "Send invitation" }));
    expect(await within(form).findByText("Enter an e-mail address")).toBeTruthy();
    expect(stub.callsTo("POST /api/labs/:labId/invitations")).toHaveLength(0);

    await user.clear(within(form).getByLabelText("E-mail address"));
    await user.type(within(form).getByLabelText("E-mail address"), "dana.new@example.org");
    await user.selectOptions(within(form).getByLabelText("Role"), "guest");
    await user.click(within(form).getByRole("button", { name: "Send invitation" }));

    expect(await within(form).findByText("Invitation sent")).toBeTruthy();
    expect(stub.callsTo("POST /api/labs/:labId/invitations")[0]).toMatchObject({
      params: { labId: TEST_LAB.labId },
      body: { email: "dana.new@example.org", role: "guest" },
    });
  });

  it("shows the server's 409 when the only lead demotes themself, and puts the picker back", async () => {
    stub = labApi("lead", {
      "PATCH /api/labs/:labId/members/:userId": errorReply(409, "CONFLICT", "A lab must keep at least one lead"),
    });
    const user = userEvent.setup();
    renderApp(LAB_PAGE);

    const picker = await screen.findByRole("combobox", { name: "Role of Ada Lindqvist" });
    await user.selectOptions(picker, "researcher");
    await user.click(screen.getByRole("button", { name: "Save role of Ada Lindqvist" }));

    const alert = await screen.findByRole("alert");
    expect(alert.textContent).toContain("A lab must keep at least one lead");
    expect(alert.textContent).toContain("Could not change the role of Ada Lindqvist to researcher");
    expect((picker as HTMLSelectElement).value).toBe("lead");
    expect(stub.callsTo("PATCH /api/labs/:labId/members/:userId")[0]).toMatchObject({
      params: { labId: TEST_LAB.labId, userId: "u-lead" },
      body: { role: "researcher" },
    });
  });

  it("answers a lab the account is not a member of with the not-found page inside the shell", async () => {
    stub = labApi("lead");
    renderApp("/labs/someone-elses-lab/lab");
    expect(await screen.findByRole("heading", { level: 1, name: "Nothing at this address" })).toBeTruthy();
    expect(stub.callsTo("GET /api/labs/:labId/members")).toHaveLength(0);
  });
});
