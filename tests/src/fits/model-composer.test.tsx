// @vitest-environment jsdom
import { useState } from "react";
import { afterEach, describe, expect, it } from "vitest";
import { cleanup, render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import type { ModelDefinitionInput } from "@shared/schemas/fits";
import { ModelComposer } from "@/features/fits/components/model-composer";
import { buildModelSpecs } from "@/features/fits/engine";

/** The composer with its own state, as the workspace holds it; `latest` exposes what it would send. */
function Harness({ initial, onState }: { initial: ModelDefinitionInput; onState: (d: ModelDefinitionInput) => void }) {
  const [def, setDef] = useState(initial);
  const built = buildModelSpecs(def, 3);
  return (
    <ModelComposer
      definition={def}
      onChange={(d) => {
        setDef(d);
        onState(d);
      }}
      specs={built.specs}
      buildError={built.error}
      atomsPerFormulaUnit={3}
    />
  );
}

function setup(initial: ModelDefinitionInput) {
  const state: { latest: ModelDefinitionInput } = { latest: initial };
  render(<Harness initial={initial} onState={(d) => (state.latest = d)} />);
  return state;
}

const terms = () => within(screen.getByRole("list", { name: "Model terms" })).getAllByRole("listitem");
const parameterRows = () => Array.from(document.querySelectorAll("tr[data-parameter]")).map((r) => r.getAttribute("data-parameter"));

afterEach(cleanup);

describe("model composer", () => {
  it("adding an Einstein mode adds its θ_E and n_E rows; a second one is numbered", async () => {
    const user = userEvent.setup();
    const state = setup({ components: [{ kind: "electronic" }, { kind: "debye", dimension: 3 }] });
    expect(parameterRows()).toEqual(["gamma", "thetaD", "nD"]);
    await user.click(screen.getByRole("button", { name: "+ Add a term" }));
    await user.click(screen.getByRole("button", { name: /^Einstein mode/ }));
    expect(terms()).toHaveLength(3);
    expect(parameterRows()).toEqual(["gamma", "thetaD", "nD", "thetaE", "nE"]);
    await user.click(screen.getByRole("button", { name: "+ Add a term" }));
    await user.click(screen.getByRole("button", { name: /^Einstein mode/ }));
    expect(parameterRows()).toEqual(["gamma", "thetaD", "nD", "thetaE", "nE", "thetaE2", "nE2"]);
    expect(screen.getByRole("listitem", { name: "Einstein mode 2" })).toBeTruthy();
    expect(state.latest.components.map((c) => c.kind)).toEqual(["electronic", "debye", "einstein", "einstein"]);
    // The units come from the engine's own parameter specs.
    const theta = document.querySelector('tr[data-parameter="thetaE2"]') as HTMLElement;
    expect(within(theta).getByText("K")).toBeTruthy();
  });

  it("fixing a parameter holds it at the typed value; bounds of a fixed parameter are disabled", async () => {
    const user = userEvent.setup();
    const state = setup({ components: [{ kind: "electronic" }, { kind: "debye", dimension: 3 }] });
    const value = screen.getByRole("textbox", { name: "n_D start value" });
    await user.type(value, "3{Enter}");
    expect(state.latest.parameters?.nD).toEqual({ value: 3 });
    const row = document.querySelector('tr[data-parameter="nD"]') as HTMLElement;
    await user.click(within(row).getByRole("checkbox", { name: /fixed/ }));
    expect(state.latest.parameters?.nD).toEqual({ value: 3, fixed: true });
    expect(screen.getByRole("textbox", { name: "n_D value" })).toBeTruthy();
    expect((screen.getByRole("textbox", { name: "n_D lower bound" }) as HTMLInputElement).disabled).toBe(true);
    await user.click(within(row).getByRole("checkbox", { name: /fixed/ }));
    expect(state.latest.parameters?.nD).toEqual({ value: 3 });
  });

  it("the atom-count constraint takes n_D out of the parameters, and needs a Debye term", async () => {
    const user = userEvent.setup();
    const state = setup({ components: [{ kind: "electronic" }, { kind: "debye", dimension: 3 }, { kind: "einstein" }] });
    await user.click(screen.getByRole("checkbox", { name: /Oscillator atoms add up to n = 3/ }));
    expect(state.latest.constrainAtoms).toBe(true);
    expect(parameterRows()).toEqual(["gamma", "thetaD", "thetaE", "nE"]);
    await user.click(screen.getByRole("button", { name: "Remove Debye lattice" }));
    expect(state.latest.constrainAtoms).toBeUndefined();
    expect((screen.getByRole("checkbox", { name: /Oscillator atoms/ }) as HTMLInputElement).disabled).toBe(true);
  });

  it("removing the first of two Einstein modes keeps the second one's settings with it", async () => {
    const user = userEvent.setup();
    const state = setup({
      components: [{ kind: "debye", dimension: 3 }, { kind: "einstein" }, { kind: "einstein" }],
      parameters: { thetaE: { value: 60 }, thetaE2: { value: 140, fixed: true } },
    });
    await user.click(screen.getByRole("button", { name: "Remove Einstein mode" }));
    expect(state.latest.parameters).toEqual({ thetaE: { value: 140, fixed: true } });
    expect(parameterRows()).toEqual(["thetaD", "nD", "thetaE", "nE"]);
  });

  it("the Debye dimension is a choice of 3D, 2D layers and 1D chains", async () => {
    const user = userEvent.setup();
    const state = setup({ components: [{ kind: "debye", dimension: 3 }] });
    await user.selectOptions(screen.getByRole("combobox", { name: "Dimension" }), "2D layers");
    expect(state.latest.components).toEqual([{ kind: "debye", dimension: 2 }]);
  });

  it("says what to do when there are no terms", () => {
    setup({ components: [] });
    expect(screen.getByText(/No terms yet/)).toBeTruthy();
  });
});
