// @vitest-environment jsdom
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { cleanup, render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { DisplaySettings } from "@/components/ui/display-settings";
import { MeasuredValue } from "@/components/ui/measured-value";
import { ResearchDataNotice, SafetyNote } from "@/components/ui/safety-note";
import { SettingsProvider } from "@/lib/settings";

beforeEach(() => window.localStorage.clear());
afterEach(cleanup);

describe("MeasuredValue", () => {
  it("follows the notation picked in the display settings and remembers it in localStorage", async () => {
    const user = userEvent.setup();
    const { container } = render(
      <SettingsProvider>
        <MeasuredValue value={342.81} sigma={1.234} unit="K" />
        <DisplaySettings />
      </SettingsProvider>,
    );
    const shown = () => container.querySelector('[aria-hidden="true"]')?.textContent;
    expect(shown()).toBe("342.8(1.2)\u00a0K");
    expect(screen.getByText(/342\.8 plus or minus 1\.2/)).toBeTruthy();

    await user.click(screen.getByRole("radio", { name: /Plus–minus/ }));
    expect(shown()).toBe("342.8 ± 1.2\u00a0K");
    expect(window.localStorage.getItem("thetafold.uncertainty-style")).toBe("plus-minus");
  });

  it("starts from the stored choice, and the theme choice sets data-theme on <html>", async () => {
    window.localStorage.setItem("thetafold.uncertainty-style", "plus-minus");
    window.localStorage.setItem("thetafold.theme", "dark");
    const user = userEvent.setup();
    const { container } = render(
      <SettingsProvider>
        <MeasuredValue value={0.6951} sigma={0.0032} />
        <DisplaySettings />
      </SettingsProvider>,
    );
    expect(container.querySelector('[aria-hidden="true"]')?.textContent).toBe("0.6951 ± 0.0032");
    expect(document.documentElement.dataset.theme).toBe("dark");
    await user.click(screen.getByRole("radio", { name: "Light" }));
    expect(document.documentElement.dataset.theme).toBe("light");
    expect(window.localStorage.getItem("thetafold.theme")).toBe("light");
  });
});

describe("SafetyNote and ResearchDataNotice", () => {
  it("names the cryogen and high-field hazards and defers to local rules and the safety officer", () => {
    render(<SafetyNote />);
    const note = screen.getByRole("complementary", { name: "Cautions" });
    for (const phrase of [/too little oxygen/, /burn skin and eyes/, /builds pressure/, /pacemakers/, /Iron and steel/, /quench/, /safety officer/]) {
      expect(note.textContent).toMatch(phrase);
    }
  });

  it("can show one topic only", () => {
    render(<SafetyNote topics={["magnetic-field"]} />);
    expect(screen.getByText("High magnetic fields")).toBeTruthy();
    expect(screen.queryByText("Liquid helium and liquid nitrogen")).toBeNull();
  });

  it("says the numbers are research data", () => {
    render(<ResearchDataNotice />);
    expect(screen.getByRole("note").textContent).toBe("Research data, not certified property data for engineering design.");
  });
});
