import { mkdirSync, mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { openDb, type Db } from "../../server/db/client";
import { runMigrations } from "../../server/db/migrate";
import { addMember, insertLab, insertUser, TEST_PASSWORD } from "../helpers/app";

/*
 * A file database prepared the way a running install has it (migrated, a lab with people), for tests that
 * start the real server on it (in this process or as a child) and talk HTTP to it.
 */

export interface PreparedInstall {
  dataDir: string;
  dbFile: string;
  labId: string;
  /** E-mail by role name; every password is TEST_PASSWORD. */
  people: { lead: string; researchers: string[]; guest: string };
}

/**
 * Makes DATA_DIR with a migrated thetafold.db holding one lab: a lead, `researchers` researchers and a guest.
 * @param researchers how many researchers (at least 1)
 */
export async function prepareInstall(researchers = 1): Promise<PreparedInstall> {
  const dataDir = path.join(mkdtempSync(path.join(tmpdir(), "thetafold-hard-")), "data");
  mkdirSync(path.join(dataDir, "files"), { recursive: true });
  const dbFile = path.join(dataDir, "thetafold.db");
  const db = openDb(dbFile);
  runMigrations(db);
  const lab = insertLab(db, "Hardening lab (synthetic)");
  const tag = path.basename(path.dirname(dataDir)).toLowerCase();
  const lead = await insertUser(db, { email: `lead-${tag}@example.org` });
  addMember(db, lab.id, lead.id, "lead");
  const rs: string[] = [];
  for (let i = 0; i < researchers; i++) {
    const r = await insertUser(db, { email: `researcher${i}-${tag}@example.org` });
    addMember(db, lab.id, r.id, "researcher");
    rs.push(r.email);
  }
  const guest = await insertUser(db, { email: `guest-${tag}@example.org` });
  addMember(db, lab.id, guest.id, "guest");
  db.$client.close();
  return { dataDir, dbFile, labId: lab.id, people: { lead: lead.email, researchers: rs, guest: guest.email } };
}

/** A small HTTP client holding one person's session cookie. */
export interface Client {
  json(method: string, url: string, body?: unknown): Promise<{ status: number; body: any }>;
  upload(url: string, bytes: Buffer, fileName: string, fields: Record<string, unknown>): Promise<{ status: number; body: any }>;
}

async function read(res: Response) {
  const text = await res.text();
  try {
    return { status: res.status, body: JSON.parse(text) as unknown };
  } catch {
    return { status: res.status, body: text as unknown };
  }
}

/**
 * Signs in through POST /api/auth/sign-in and returns a client with that session.
 * @param base e.g. http://127.0.0.1:40123
 */
export async function signIn(base: string, email: string): Promise<Client> {
  const res = await fetch(`${base}/api/auth/sign-in`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email, password: TEST_PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`sign-in ${email}: ${res.status} ${await res.text()}`);
  const cookie = res.headers.getSetCookie().find((c) => c.startsWith("auth_session="))!.split(";")[0];
  return {
    async json(method, url, body) {
      return read(
        await fetch(base + url, {
          method,
          headers: { cookie, ...(body === undefined ? {} : { "content-type": "application/json" }) },
          body: body === undefined ? undefined : JSON.stringify(body),
        }),
      ) as Promise<{ status: number; body: any }>;
    },
    async upload(url, bytes, fileName, fields) {
      const form = new FormData();
      for (const [k, v] of Object.entries(fields)) form.append(k, typeof v === "string" ? v : JSON.stringify(v));
      form.append("file", new Blob([new Uint8Array(bytes)]), fileName);
      return read(await fetch(base + url, { method: "POST", headers: { cookie }, body: form })) as Promise<{ status: number; body: any }>;
    },
  };
}

/** Opens the install's database read-write from the test (WAL lets it sit beside the server's connection). */
export function openInstallDb(install: PreparedInstall): Db {
  return openDb(install.dbFile);
}

/** Consistency of what is stored: integrity, points per run, parameters per fit, files per row. */
export function consistency(db: Db) {
  const $ = db.$client;
  return {
    integrity: ($.pragma("integrity_check") as { integrity_check: string }[]).map((r) => r.integrity_check),
    foreignKeyViolations: ($.pragma("foreign_key_check") as unknown[]).length,
    runsWithWrongPointCount: $.prepare(
      "select r.id from runs r where r.point_count <> (select count(*) from run_points p where p.run_id = r.id)",
    ).all().length,
    fitsWithoutParameters: $.prepare("select f.id from fits f where not exists (select 1 from fit_parameters p where p.fit_id = f.id)").all().length,
    runsWithoutFileRow: $.prepare("select r.id from runs r where not exists (select 1 from stored_files s where s.sha256 = r.file_sha256)").all().length,
  };
}

/** The expected answer of consistency() when everything is whole. */
export const CONSISTENT = { integrity: ["ok"], foreignKeyViolations: 0, runsWithWrongPointCount: 0, fitsWithoutParameters: 0, runsWithoutFileRow: 0 };
