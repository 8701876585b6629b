// @vitest-environment jsdom
import { afterEach, describe, expect, it } from "vitest";
import { cleanup, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { errorReply, reply, stubFetch } from "../../../helpers/fetch-stub";
import { meFixture, renderApp, TEST_LAB } from "../../../helpers/render-app";

const signedOut = {
  "GET /api/setup": reply(200, { needsSetup: false, fakeMail: true }),
  "GET /api/me": errorReply(401, "UNAUTHENTICATED", "Not signed in"),
};

let stub: ReturnType<typeof stubFetch>;
afterEach(() => {
  cleanup();
  stub.restore();
});

describe("sign-in page", () => {
  it("shows the shared schema's field errors and sends nothing when the form is empty or the address is malformed", async () => {
    stub = stubFetch({ ...signedOut, "POST /api/auth/sign-in": reply(200, meFixture("lead")) });
    const user = userEvent.setup();
    renderApp("/sign-in");

    await user.click(await screen.findByRole("button", { name: "Sign in" }));
    expect(await screen.findByText("Enter an e-mail address")).toBeTruthy();
    expect(screen.getByText("Enter your password")).toBeTruthy();
    expect(screen.getByLabelText("E-mail address").getAttribute("aria-invalid")).toBe("true");
    expect(document.activeElement).toBe(screen.getByLabelText("E-mail address"));

    await user.type(screen.getByLabelText("E-mail address"), "lead-at-example.org");
    await user.type(screen.getByLabelText("Password"), "something");
    await user.click(screen.getByRole("button", { name: "Sign in" }));
    expect(await screen.findByText("Enter an e-mail address")).toBeTruthy();
    expect(screen.queryByText("Enter your password")).toBeNull();
    expect(stub.callsTo("POST /api/auth/sign-in")).toHaveLength(0);
  });

  it("shows the server's 401 message inline and keeps what was typed", async () => {
    stub = stubFetch({
      ...signedOut,
      "POST /api/auth/sign-in": errorReply(401, "UNAUTHENTICATED", "That e-mail and password do not match an account"),
    });
    const user = userEvent.setup();
    renderApp("/sign-in");

    await user.type(await screen.findByLabelText("E-mail address"), "lead@example.org");
    await user.type(screen.getByLabelText("Password"), "not the password");
    await user.click(screen.getByRole("button", { name: "Sign in" }));

    const alert = await screen.findByRole("alert");
    expect(alert.textContent).toContain("That e-mail and password do not match an account");
    expect((screen.getByLabelText("E-mail address") as HTMLInputElement).value).toBe("lead@example.org");
    expect(stub.callsTo("POST /api/auth/sign-in")[0].body).toEqual({ email: "lead@example.org", password: "not the password" });
  });

  it("opens the lab's Samples page after a good sign-in", async () => {
    stub = stubFetch({ ...signedOut, "POST /api/auth/sign-in": reply(200, meFixture("researcher")) });
    const user = userEvent.setup();
    const { router } = renderApp("/sign-in");

    await user.type(await screen.findByLabelText("E-mail address"), "researcher@example.org");
    await user.type(screen.getByLabelText("Password"), "correct horse battery");
    await user.click(screen.getByRole("button", { name: "Sign in" }));

    expect(await screen.findByRole("heading", { level: 1, name: "Samples" })).toBeTruthy();
    expect(router.state.location.pathname).toBe(`/labs/${TEST_LAB.labId}/samples`);
    expect(screen.getByRole("navigation", { name: "Lab sections" })).toBeTruthy();
  });

  it("sends a signed-out visitor of a lab page to sign-in and back there afterwards", async () => {
    stub = stubFetch({ ...signedOut, "POST /api/auth/sign-in": reply(200, meFixture("guest")) });
    const user = userEvent.setup();
    const { router } = renderApp(`/labs/${TEST_LAB.labId}/compare`);

    expect(await screen.findByRole("heading", { level: 1, name: "Sign in" })).toBeTruthy();
    expect(router.state.location.search).toBe(`?next=${encodeURIComponent(`/labs/${TEST_LAB.labId}/compare`)}`);
    await user.type(screen.getByLabelText("E-mail address"), "guest@example.org");
    await user.type(screen.getByLabelText("Password"), "correct horse battery");
    await user.click(screen.getByRole("button", { name: "Sign in" }));
    expect(await screen.findByRole("heading", { level: 1, name: "Compare" })).toBeTruthy();
  });
});
