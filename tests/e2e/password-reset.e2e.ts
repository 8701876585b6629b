import { expect } from "vitest";
import { signIn, test } from "./browser";

test("a researcher resets a forgotten password through the e-mailed link, then changes it back on the account page", async ({ browser, baseUrl, page, demoPassword }) => {
  const account = "researcher@example.org";
  const temporary = "a fresh temporary passphrase";

  // Ask for the link, signed out.
  await page.goto("/sign-in");
  await page.getByRole("link", { name: "Forgot your password?" }).click();
  // The sign-in form has an "E-mail address" field too: wait for the new page before typing.
  await page.waitForURL(/\/forgot-password$/);
  await page.getByRole("heading", { name: "Choose a new password" }).waitFor();
  await page.getByLabel("E-mail address").fill(account);
  await page.getByRole("button", { name: "Send the link" }).click();
  await page.getByText("Check your inbox").waitFor();

  // The site administrator's outbox holds the message; its link opens the reset page.
  const admin = await browser.newContext({ baseURL: baseUrl });
  let href: string | null = null;
  try {
    const adminPage = await admin.newPage();
    await signIn(adminPage, "lead@example.org", demoPassword);
    await adminPage.goto("/outbox");
    const messages = adminPage.getByRole("list", { name: "Received messages" });
    await messages.getByRole("link", { name: /to researcher@example\.org/ }).first().click();
    href = await adminPage.getByRole("article").getByRole("link", { name: /\/reset-password\// }).getAttribute("href");
  } finally {
    await admin.close();
  }
  expect(href).toMatch(/\/reset-password\/[A-Za-z0-9_-]{20,}$/);

  await page.goto(href!);
  await page.getByLabel("New password", { exact: true }).fill(temporary);
  await page.getByLabel("New password again").fill("something else entirely");
  await page.getByRole("button", { name: "Save the new password" }).click();
  await page.getByText("The two passwords differ").waitFor();
  await page.getByLabel("New password again").fill(temporary);
  await page.getByRole("button", { name: "Save the new password" }).click();
  await page.waitForURL(/\/sign-in\?reset=done$/);
  await page.getByText("Sign in with your new password.").waitFor();

  // The old password no longer works; the new one does.
  await page.getByLabel("E-mail address").fill(account);
  await page.getByLabel("Password", { exact: true }).fill(demoPassword);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.getByRole("alert").waitFor();
  await signIn(page, account, temporary);

  // Put the demo password back through the account page, so other stories can sign in as the researcher.
  await page.goto("/account");
  await page.getByLabel("Current password").fill(temporary);
  await page.getByLabel("New password", { exact: true }).fill(demoPassword);
  await page.getByLabel("New password again").fill(demoPassword);
  await page.getByRole("button", { name: "Change password" }).click();
  await page.getByText("Password changed.").waitFor();
});
