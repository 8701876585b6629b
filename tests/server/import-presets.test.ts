import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { ImportPresetListSchema } from "@shared/schemas/import-presets";
import { ImportPresetSchema } from "@shared/schemas/ingest";
import { makeTestApp, seedRoles } from "../helpers/app";
import { footprint } from "./runs-helpers";

const mapping = {
  columns: { temperature: "T (K)", heatCapacity: "Cp (µJ/K)", sigma: "Cp error (µJ/K)" },
  units: { temperature: "K", heatCapacity: "uJ/K" },
};

async function setup() {
  const t = makeTestApp();
  const cast = await seedRoles(t);
  return { t, ...cast, url: `/api/labs/${cast.lab.id}/import-presets` };
}

describe("import presets API", () => {
  it("saves a named mapping, lists the lab's presets by name, and deletes one", async () => {
    const { t, agents, url } = await setup();
    expect((await agents.guest.get(url)).body).toEqual([]);
    const a = await agents.researcher.post(url).send({ name: "Heat Bench tab export", mapping });
    expect(a.status).toBe(201);
    const preset = ImportPresetSchema.parse(a.body);
    // µJ/K as typed is stored under its canonical code.
    expect(preset.mapping.units.heatCapacity).toBe("uJ/K");
    await agents.lead.post(url).send({ name: "Another", mapping: { ...mapping, units: { temperature: "C", heatCapacity: "J/K" } } }).expect(201);
    const list = ImportPresetListSchema.parse((await agents.guest.get(url)).body);
    expect(list.map((p) => p.name)).toEqual(["Another", "Heat Bench tab export"]);
    expect((await agents.researcher.delete(`${url}/${preset.id}`)).status).toBe(204);
    expect((await agents.researcher.delete(`${url}/${preset.id}`)).status).toBe(404);
    expect(footprint(t).presets).toBe(1);
  });

  it("refuses a repeated name with 409 and a mapping that uses one column twice with 400 naming the path", async () => {
    const { t, agents, url } = await setup();
    await agents.researcher.post(url).send({ name: "P", mapping }).expect(201);
    const again = await agents.researcher.post(url).send({ name: "P", mapping });
    expect(again.status).toBe(409);
    expect(ApiErrorSchema.parse(again.body).error.code).toBe("CONFLICT");
    const twice = await agents.researcher
      .post(url)
      .send({ name: "Q", mapping: { ...mapping, columns: { temperature: "T (K)", heatCapacity: "T (K)" } } });
    expect(twice.status).toBe(400);
    expect(ApiErrorSchema.parse(twice.body).error.details?.map((d) => d.path)).toContain("mapping.columns.heatCapacity");
    const badUnit = await agents.researcher.post(url).send({ name: "R", mapping: { ...mapping, units: { temperature: "F", heatCapacity: "J/K" } } });
    expect(badUnit.status).toBe(400);
    expect((await agents.researcher.post(url).send({ name: " ", mapping })).status).toBe(400);
    expect(footprint(t).presets).toBe(1);
  });

  it("keeps to the role matrix: anonymous 401, guest read-only 403, outsider and admin-not-member 404", async () => {
    const { t, agents, url } = await setup();
    const preset = ImportPresetSchema.parse((await agents.lead.post(url).send({ name: "P", mapping })).body);
    const calls = {
      list: (a: typeof agents.lead) => a.get(url),
      create: (a: typeof agents.lead) => a.post(url).send({ name: "New", mapping }),
      remove: (a: typeof agents.lead) => a.delete(`${url}/${preset.id}`),
    };
    for (const [name, call] of Object.entries(calls)) {
      expect((await call(agents.anonymous)).status, `anonymous ${name}`).toBe(401);
      expect((await call(agents.outsider)).status, `outsider ${name}`).toBe(404);
      expect((await call(agents.admin)).status, `admin ${name}`).toBe(404);
      expect((await call(agents.guest)).status, `guest ${name}`).toBe(name === "list" ? 200 : 403);
    }
    expect(footprint(t).presets).toBe(1);
    expect((await calls.create(agents.researcher)).status).toBe(201);
    expect((await calls.remove(agents.researcher)).status).toBe(204);
  });
});
