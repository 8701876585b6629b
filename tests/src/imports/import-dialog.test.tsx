// @vitest-environment jsdom
import { useState } from "react";
import { afterEach, describe, expect, it, vi } from "vitest";
import { cleanup, render, screen, waitFor, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import type { TableSummary } from "@shared/schemas/ingest";
import type { RunCommitResult, RunUploadPreview } from "@shared/schemas/runs";
import { Providers } from "@/app/providers";
import { ColumnMapping } from "@/features/imports/components/column-mapping";
import { ImportDialog } from "@/features/imports/components/import-dialog";
import { assignRole, draftToMapping, EMPTY_DRAFT, type MappingDraft } from "@/features/imports/utils";
import { reply, stubFetch } from "../../helpers/fetch-stub";
import { testQueryClient } from "../../helpers/render-app";

/** A synthetic export as the reader summarises it: three number columns, units in the header. */
const TABLE: TableSummary = {
  header: ["Time (s)", "Temperature (K)", "Heat capacity (µJ/K)", "Error (µJ/K)", "Field (Oe)"],
  headerLine: 4,
  unitsLine: null,
  unitTexts: ["s", "K", "µJ/K", "µJ/K", "Oe"],
  units: [null, { kind: "temperature", code: "K" }, { kind: "heatCapacity", code: "uJ/K" }, { kind: "heatCapacity", code: "uJ/K" }, { kind: "field", code: "Oe" }],
  columnKinds: ["number", "number", "number", "number", "number"],
  delimiter: ",",
  decimalMark: ".",
  preamble: ["SYNTHETIC test export", "Sample: T-1", ""],
  rowCount: 3,
  firstRows: [
    { line: 5, cells: ["10", "2.0", "0.25", "0.001", "0"] },
    { line: 6, cells: ["20", "3.0", "0.61", "0.002", "0"] },
    { line: 7, cells: ["30", "4.0", "1.20", "0.004", "0"] },
  ],
};

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

function MappingHarness({ initial, onDraft }: { initial: MappingDraft; onDraft: (d: MappingDraft) => void }) {
  const [draft, setDraft] = useState(initial);
  return (
    <ColumnMapping
      table={TABLE}
      draft={draft}
      onChange={(d) => {
        setDraft(d);
        onDraft(d);
      }}
    />
  );
}

describe("column mapping controls", () => {
  it("gives each role to one column only: choosing it for another column frees the first", async () => {
    const seen: MappingDraft[] = [];
    render(<MappingHarness initial={{ columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (µJ/K)" }, units: { temperature: "K", heatCapacity: "uJ/K" } }} onDraft={(d) => seen.push(d)} />);
    const use = (name: string) => screen.getByRole("combobox", { name: `Use of column ${name}` }) as HTMLSelectElement;
    expect(use("Temperature (K)").value).toBe("temperature");
    expect(use("Time (s)").value).toBe("ignore");
    await userEvent.selectOptions(use("Time (s)"), "temperature");
    expect(use("Time (s)").value).toBe("temperature");
    expect(use("Temperature (K)").value).toBe("ignore");
    expect(seen.at(-1)!.columns).toEqual({ temperature: "Time (s)", heatCapacity: "Heat capacity (µJ/K)" });
  });

  it("shows the field unit only once a field column is chosen, and the mapping is complete only with it", async () => {
    let last: MappingDraft = EMPTY_DRAFT;
    render(<MappingHarness initial={{ columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (µJ/K)" }, units: { temperature: "K", heatCapacity: "uJ/K" } }} onDraft={(d) => (last = d)} />);
    expect(screen.queryByRole("combobox", { name: "Field unit" })).toBeNull();
    await userEvent.selectOptions(screen.getByRole("combobox", { name: "Use of column Field (Oe)" }), "field");
    const fieldUnit = screen.getByRole("combobox", { name: "Field unit" });
    expect(draftToMapping(last).problems).toEqual(["Choose the unit of the field column."]);
    expect(screen.getByText("The header says “Oe”.")).toBeTruthy();
    await userEvent.selectOptions(fieldUnit, "Oe");
    expect(draftToMapping(last).mapping).toEqual({
      columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (µJ/K)", field: "Field (Oe)" },
      units: { temperature: "K", heatCapacity: "uJ/K", field: "Oe" },
    });
    await userEvent.selectOptions(screen.getByRole("combobox", { name: "Use of column Error (µJ/K)" }), "sigma");
    await userEvent.selectOptions(screen.getByRole("combobox", { name: "Uncertainty given" }), "percent");
    expect(draftToMapping(last).mapping?.sigmaScale).toBe("percent");
  });

  it("changes units with their own controls and lists what is still missing", async () => {
    let last: MappingDraft = EMPTY_DRAFT;
    render(<MappingHarness initial={EMPTY_DRAFT} onDraft={(d) => (last = d)} />);
    expect(draftToMapping(EMPTY_DRAFT).problems).toEqual([
      "Choose the temperature column.",
      "Choose the heat-capacity column.",
      "Choose the temperature unit.",
      "Choose the heat-capacity unit.",
    ]);
    await userEvent.selectOptions(screen.getByRole("combobox", { name: "Use of column Temperature (K)" }), "temperature");
    await userEvent.selectOptions(screen.getByRole("combobox", { name: "Use of column Heat capacity (µJ/K)" }), "heatCapacity");
    await userEvent.selectOptions(screen.getByRole("combobox", { name: "Temperature unit" }), "C");
    await userEvent.selectOptions(screen.getByRole("combobox", { name: "Heat-capacity unit" }), "mJ/K");
    expect(draftToMapping(last).mapping?.units).toEqual({ temperature: "C", heatCapacity: "mJ/K" });
    // Freeing the field column drops its unit.
    expect(assignRole({ columns: { field: "Field (Oe)" }, units: { field: "Oe" } }, "Field (Oe)", "ignore")).toEqual({ columns: {}, units: {} });
  });
});

// ---------------------------------------------------------------- the dialog, with a fake XMLHttpRequest

interface SentUpload {
  url: string;
  fields: Record<string, string>;
  fileName: string;
}

/** Answers multipart posts like the server would, with upload progress events. */
function fakeXhr(answer: (sent: SentUpload) => { status: number; body: unknown }) {
  const sent: SentUpload[] = [];
  class FakeXMLHttpRequest {
    upload: { onprogress: ((e: { lengthComputable: boolean; loaded: number; total: number }) => void) | null } = { onprogress: null };
    onload: (() => void) | null = null;
    onerror: (() => void) | null = null;
    onabort: (() => void) | null = null;
    status = 0;
    statusText = "";
    responseText = "";
    withCredentials = false;
    private url = "";
    open(_method: string, url: string) {
      this.url = url;
    }
    setRequestHeader() {}
    abort() {
      this.onabort?.();
    }
    send(form: FormData) {
      const fields: Record<string, string> = {};
      let fileName = "";
      for (const [k, v] of form.entries()) {
        if (typeof v === "string") fields[k] = v;
        else fileName = (v as File).name;
      }
      const s = { url: this.url, fields, fileName };
      sent.push(s);
      setTimeout(() => {
        this.upload.onprogress?.({ lengthComputable: true, loaded: 50, total: 100 });
        const a = answer(s);
        this.status = a.status;
        this.responseText = JSON.stringify(a.body);
        this.onload?.();
      }, 5);
    }
  }
  vi.stubGlobal("XMLHttpRequest", FakeXMLHttpRequest);
  return sent;
}

const MAPPING = {
  columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (µJ/K)", sigma: "Error (µJ/K)" },
  units: { temperature: "K" as const, heatCapacity: "uJ/K" as const },
};

function previewBody(mapping: RunUploadPreview["mapping"], warnings = true): RunUploadPreview {
  return {
    file: { fileName: "t1.csv", sizeBytes: 200, sha256: "a".repeat(64), duplicateOfRunId: null },
    table: TABLE,
    proposal: { mapping: MAPPING, columns: MAPPING.columns, units: MAPPING.units, unplaced: ["Time (s)", "Field (Oe)"], needs: [], assumed: [] },
    mapping,
    runs: mapping
      ? [
          {
            fieldT: null,
            points: [2, 3, 4].map((t, i) => ({ temperatureK: t, heatCapacity: 0.01 * t ** 3, sigma: 1e-4, sourceLine: 5 + i, rowsAveraged: 1, outsideAddendaRange: false })),
            warnings: warnings ? [{ code: "FEW_POINTS", message: "only 3 point(s): at least 10 are needed for a useful fit", count: 3, lines: [] }] : [],
          },
        ]
      : [],
  };
}

const COMMITTED: RunCommitResult = {
  file: { fileName: "t1.csv", sizeBytes: 200, sha256: "a".repeat(64), duplicateOfRunId: null },
  runs: [
    {
      id: "run-9",
      kind: "sample",
      sampleId: "s1",
      platform: "",
      label: "First scan",
      fileName: "t1.csv",
      fileSha256: "a".repeat(64),
      fieldT: null,
      addendaRunId: null,
      pointCount: 3,
      maskedCount: 0,
      tMinK: 2,
      tMaxK: 4,
      warnings: [],
      notes: "",
      createdAt: "2026-12-01T10:00:00.000Z",
      createdByName: "Test researcher",
    },
  ],
};

function renderDialog(onCommitted = vi.fn()) {
  stubFetch({ "GET /api/labs/:labId/import-presets": reply(200, [{ id: "p1", name: "Other instrument", mapping: { columns: { temperature: "T", heatCapacity: "C" }, units: { temperature: "K", heatCapacity: "J/K" } }, createdAt: "2026-11-01T10:00:00.000Z" }]) });
  const onClose = vi.fn();
  render(
    <Providers queryClient={testQueryClient()}>
      <ImportDialog
        target={{ kind: "sample", labId: "lab-1", sampleId: "s1" }}
        title="Upload a run of T-1"
        atomsPerFormulaUnit={1}
        onClose={onClose}
        onCommitted={onCommitted}
        runHref={(id) => `/labs/lab-1/runs/${id}`}
      />
    </Providers>,
  );
  return { onClose, onCommitted };
}

const file = () => new File(["SYNTHETIC test export\n"], "t1.csv", { type: "text/csv" });

describe("import dialog", { timeout: 60_000 }, () => {
  it("uploads for a preview, shows the first rows with the proposed columns, re-reads after a unit change, warns, and commits", async () => {
    const sent = fakeXhr((s) => {
      if (s.url.endsWith("/preview")) return { status: 200, body: previewBody(s.fields.mapping ? JSON.parse(s.fields.mapping) : MAPPING) };
      return { status: 201, body: COMMITTED };
    });
    const { onCommitted } = renderDialog();
    const dialog = screen.getByRole("dialog", { name: "Upload a run of T-1" });
    await userEvent.upload(within(dialog).getByLabelText("Export file"), file());
    const table = await within(dialog).findByRole("table", { name: /First rows of the file/ });
    expect(within(table).getAllByRole("row")).toHaveLength(4);
    expect((within(dialog).getByRole("combobox", { name: "Use of column Temperature (K)" }) as HTMLSelectElement).value).toBe("temperature");
    // The first preview went without a mapping (the server proposes one).
    expect(sent[0]).toMatchObject({ url: "/api/labs/lab-1/samples/s1/runs/preview", fileName: "t1.csv" });
    expect(sent[0].fields.mapping).toBeUndefined();
    expect(await within(dialog).findByText(/only 3 point\(s\)/)).toBeTruthy();

    await userEvent.selectOptions(within(dialog).getByRole("combobox", { name: "Heat-capacity unit" }), "mJ/K");
    await waitFor(() => expect(sent.filter((s) => s.url.endsWith("/preview"))).toHaveLength(2), { timeout: 3000 });
    expect(JSON.parse(sent[1].fields.mapping).units).toEqual({ temperature: "K", heatCapacity: "mJ/K" });

    await userEvent.type(within(dialog).getByLabelText(/Run label/), "First scan");
    const commit = within(dialog).getByRole("button", { name: "Commit with 1 warning" });
    await waitFor(() => expect((commit as HTMLButtonElement).disabled).toBe(false));
    await userEvent.click(commit);
    expect(await within(dialog).findByText("Run stored")).toBeTruthy();
    const last = sent.at(-1)!;
    expect(last.url).toBe("/api/labs/lab-1/samples/s1/runs");
    expect(last.fields.label).toBe("First scan");
    expect(JSON.parse(last.fields.mapping).units.heatCapacity).toBe("mJ/K");
    expect(within(dialog).getByRole("link", { name: "First scan" }).getAttribute("href")).toBe("/labs/lab-1/runs/run-9");
    expect(onCommitted).toHaveBeenCalledTimes(1);
  });

  it("shows a refusal with its line and column, and says nothing was stored", async () => {
    fakeXhr(() => ({
      status: 400,
      body: {
        error: {
          code: "VALIDATION_FAILED",
          message: "line 6, column 'Heat capacity (µJ/K)': 'abc' is not a number",
          details: [{ line: 6, column: "Heat capacity (µJ/K)", message: "line 6, column 'Heat capacity (µJ/K)': 'abc' is not a number" }],
        },
      },
    }));
    renderDialog();
    await userEvent.upload(screen.getByLabelText("Export file"), file());
    const alert = await screen.findByRole("alert");
    expect(within(alert).getByText("The file was refused")).toBeTruthy();
    expect(within(alert).getByText(/line 6, column 'Heat capacity \(µJ\/K\)'/)).toBeTruthy();
    expect(within(alert).getByText(/Nothing was stored/)).toBeTruthy();
    // Back at the file picker to try again.
    expect(screen.getByRole("button", { name: "Choose a file…" })).toBeTruthy();
  });

  it("links to the first upload when the same file was already committed (409)", async () => {
    fakeXhr((s) =>
      s.url.endsWith("/preview")
        ? { status: 200, body: previewBody(MAPPING, false) }
        : { status: 409, body: { error: { code: "CONFLICT", message: "This file was already uploaded to sample 'T-1' as run 'Old' on 2026-11-30", details: [{ path: "runs/run-1", message: "same SHA-256" }] } } },
    );
    renderDialog();
    await userEvent.upload(screen.getByLabelText("Export file"), file());
    const commit = await screen.findByRole("button", { name: "Commit run" });
    await waitFor(() => expect((commit as HTMLButtonElement).disabled).toBe(false));
    await userEvent.click(commit);
    expect(await screen.findByText("Already uploaded")).toBeTruthy();
    expect(screen.getByRole("link", { name: "Open the first upload" }).getAttribute("href")).toBe("/labs/lab-1/runs/run-1");
  });

  it("refuses a preset that names columns this file lacks, and closes on Escape", async () => {
    fakeXhr(() => ({ status: 200, body: previewBody(MAPPING, false) }));
    const { onClose } = renderDialog();
    await userEvent.upload(screen.getByLabelText("Export file"), file());
    const presets = await screen.findByRole("combobox", { name: "Saved presets" });
    await waitFor(() => expect((presets as HTMLSelectElement).disabled).toBe(false));
    await userEvent.selectOptions(presets, "p1");
    expect(await screen.findByText(/names column\(s\) “T”, “C” that this file does not have/)).toBeTruthy();
    await userEvent.keyboard("{Escape}");
    expect(onClose).toHaveBeenCalled();
  });
});
