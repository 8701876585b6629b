import { expect } from "vitest";
import { signIn, test } from "./browser";

// The demo lab and people come from the server's demo seed (server/db/seed.ts): invented, labelled synthetic.
const LEAD = "lead@example.org";

test("the demo lead signs in, invites an address from the Lab page, reads the invitation in the Outbox and signs out", async ({ page, demoPassword, pageErrors }) => {
  const invitee = `new.member+${Date.now()}@example.org`;

  // Signed out, "/" leads to the sign-in page.
  await page.goto("/");
  await page.waitForURL(/\/sign-in/);
  await signIn(page, LEAD, demoPassword);
  await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Samples");

  // Lab page: the three demo people, and the invite form a lead gets.
  await page.getByRole("navigation", { name: "Lab sections" }).getByRole("link", { name: "Lab" }).click();
  await page.waitForURL(/\/labs\/[^/]+\/lab$/);
  const members = page.getByRole("table", { name: "Members of this lab and their roles" });
  await members.waitFor();
  for (const email of ["lead@example.org", "researcher@example.org", "guest@example.org"]) {
    expect(await members.getByText(email, { exact: true }).count()).toBe(1);
  }
  const form = page.getByRole("form", { name: "Invite someone" });
  await form.getByLabel("E-mail address").fill(invitee);
  await form.getByLabel("Role").selectOption("researcher");
  await form.getByRole("button", { name: "Send invitation" }).click();
  await form.getByText("Invitation sent").waitFor();
  await page.getByRole("list", { name: "Pending invitations" }).getByText(invitee, { exact: true }).waitFor();

  // Outbox, through the account menu: the message to the invitee, with its link.
  await page.getByRole("button", { name: /Dr\. Ilse Marrow/ }).click();
  await page.getByRole("link", { name: /Outbox/ }).click();
  await page.waitForURL(/\/outbox$/);
  const messages = page.getByRole("list", { name: "Received messages" });
  await messages.getByRole("link", { name: new RegExp(`to ${invitee.replace(/[.+]/g, "\\$&")}`) }).click();
  const message = page.getByRole("article");
  await message.getByRole("heading", { name: /Invitation to join/ }).waitFor();
  const link = message.getByRole("link", { name: /\/invite\// });
  expect(await link.getAttribute("href")).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/invite\/[A-Za-z0-9_-]{20,}$/);

  // Sign out: back on sign-in, and the lab is closed to this browser again.
  await page.getByRole("button", { name: /Dr\. Ilse Marrow/ }).click();
  await page.getByRole("button", { name: "Sign out" }).click();
  await page.waitForURL(/\/sign-in$/);
  await page.goto("/outbox");
  await page.waitForURL(/\/sign-in\?next=%2Foutbox$/);
  expect(pageErrors).toEqual([]);
});

test("the invitee follows the e-mailed link, creates an account and lands in the lab as a researcher", async ({ browser, baseUrl, page, demoPassword }) => {
  const invitee = `dana.okoro+${Date.now()}@example.org`;
  await signIn(page, LEAD, demoPassword);
  await page.getByRole("navigation", { name: "Lab sections" }).getByRole("link", { name: "Lab" }).click();
  const form = page.getByRole("form", { name: "Invite someone" });
  await form.getByLabel("E-mail address").fill(invitee);
  await form.getByRole("button", { name: "Send invitation" }).click();
  await form.getByText("Invitation sent").waitFor();
  await page.goto("/outbox");
  await page.getByRole("list", { name: "Received messages" }).getByRole("link", { name: new RegExp(invitee.replace(/[.+]/g, "\\$&")) }).click();
  const href = await page.getByRole("article").getByRole("link", { name: /\/invite\// }).getAttribute("href");
  expect(href).toBeTruthy();

  // A separate browser context: the invitee has no session.
  const inviteeContext = await browser.newContext({ baseURL: baseUrl });
  try {
    const invitePage = await inviteeContext.newPage();
    await invitePage.goto(href!);
    await invitePage.getByRole("heading", { level: 1, name: /Join Low-Temperature Calorimetry Group/ }).waitFor();
    await invitePage.getByLabel("Your name").fill("Dana Okoro (synthetic)");
    await invitePage.getByLabel("Password", { exact: true }).fill("short");
    await invitePage.getByRole("button", { name: "Create account and join" }).click();
    await invitePage.getByText("Use at least 10 characters").waitFor();
    await invitePage.getByLabel("Password", { exact: true }).fill("a long enough passphrase");
    await invitePage.getByLabel("Password again").fill("a long enough passphrase");
    await invitePage.getByRole("button", { name: "Create account and join" }).click();
    await invitePage.waitForURL(/\/labs\/[^/]+\/samples$/);
    await invitePage.getByRole("navigation", { name: "Lab sections" }).getByRole("link", { name: "Lab" }).click();
    const me = invitePage.getByRole("table", { name: "Members of this lab and their roles" }).getByRole("row", { name: /Dana Okoro/ });
    await me.getByText("Researcher").waitFor();
    // A researcher gets no invite form.
    expect(await invitePage.getByRole("form", { name: "Invite someone" }).count()).toBe(0);

    // The link is used up now.
    await invitePage.goto(href!);
    await invitePage.getByRole("heading", { level: 1, name: "This invitation cannot be used" }).waitFor();
  } finally {
    await inviteeContext.close();
  }
});
