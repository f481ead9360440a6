// Versioned JSON documents: programs and studies. Saving never overwrites: each save under an
// existing id adds the next version, so a run can always point at exactly what it ran.

import { read, write, type StoreContext } from './context.ts';
import { decodeJson, encodeJson } from './json-column.ts';
import { fail, fileLabel, ok } from './problems.ts';
import type { Checked, Problem, VersionEntry } from './types.ts';
import { checkText, isPositiveId, preview } from './validate.ts';

/** Table names are fixed per kind here, never taken from input. */
export interface DocumentKind {
  head: 'programs' | 'studies';
  versions: 'program_versions' | 'study_versions';
  idColumn: 'program_id' | 'study_id';
  /** Field names in inputs, for messages: `programId`, `program`. */
  idField: 'programId' | 'studyId';
  docField: 'program' | 'study';
}

export const PROGRAMS: DocumentKind = { head: 'programs', versions: 'program_versions', idColumn: 'program_id', idField: 'programId', docField: 'program' };
export const STUDIES: DocumentKind = { head: 'studies', versions: 'study_versions', idColumn: 'study_id', idField: 'studyId', docField: 'study' };

export interface SaveDocumentInput { id?: unknown; name: unknown; document: unknown }
export interface StoredDocument { id: number; version: number; name: string; savedAt: string; document: unknown }
export interface DocumentSummary { id: number; name: string; latestVersion: number; createdAt: string; updatedAt: string }

function noSuch<T>(ctx: StoreContext, kind: DocumentKind, id: unknown): Checked<T> {
  return fail(`There is no ${kind.docField} with id ${preview(id)} in the workspace ${fileLabel(ctx.file)}. Pick one from the list of saved ${kind.head}.`, kind.idField);
}

function headExists(ctx: StoreContext, kind: DocumentKind, id: number): boolean {
  return ctx.db.prepare(`SELECT 1 FROM ${kind.head} WHERE id = ?`).get(id) !== undefined;
}

export function saveDocument(ctx: StoreContext, kind: DocumentKind, input: SaveDocumentInput): Checked<{ id: number; version: number }> {
  const doing = `save the ${kind.docField}`;
  const problems: Problem[] = [];
  if (input.id !== undefined && !isPositiveId(input.id)) {
    problems.push({ path: kind.idField, message: `${kind.idField} must be the whole-number id of a saved ${kind.docField} (got ${preview(input.id)}); leave it out to save a new ${kind.docField}.` });
  }
  checkText(input.name, 'name', `The ${kind.docField}'s name`, problems);
  const encoded = encodeJson(input.document, kind.docField);
  if (!encoded.ok) problems.push(...encoded.problems);
  if (problems.length > 0 || !encoded.ok) return { ok: false, problems };
  const name = input.name as string;

  return write(ctx, doing, () => {
    const now = ctx.now();
    let id: number;
    if (input.id === undefined) {
      id = Number(ctx.db.prepare(`INSERT INTO ${kind.head} (name, created_at, updated_at) VALUES (?, ?, ?)`).run(name, now, now).lastInsertRowid);
    } else {
      id = input.id as number;
      if (!headExists(ctx, kind, id)) return noSuch(ctx, kind, id);
      ctx.db.prepare(`UPDATE ${kind.head} SET name = ?, updated_at = ? WHERE id = ?`).run(name, now, id);
    }
    const last = ctx.db.prepare(`SELECT COALESCE(MAX(version), 0) AS v FROM ${kind.versions} WHERE ${kind.idColumn} = ?`).get(id) as { v: number };
    const version = last.v + 1;
    ctx.db.prepare(`INSERT INTO ${kind.versions} (${kind.idColumn}, version, name, saved_at, document) VALUES (?, ?, ?, ?, ?)`)
      .run(id, version, name, now, encoded.value);
    return ok({ id, version });
  });
}

export function getDocument(ctx: StoreContext, kind: DocumentKind, id: unknown, version?: unknown): Checked<StoredDocument> {
  if (!isPositiveId(id)) return noSuch(ctx, kind, id);
  if (version !== undefined && !isPositiveId(version)) {
    return fail(`The version must be a whole number from 1 up (got ${preview(version)}); leave it out for the latest.`, 'version');
  }
  return read(ctx, `open the ${kind.docField}`, () => {
    const row = (version === undefined
      ? ctx.db.prepare(`SELECT version, name, saved_at, document FROM ${kind.versions} WHERE ${kind.idColumn} = ? ORDER BY version DESC LIMIT 1`).get(id)
      : ctx.db.prepare(`SELECT version, name, saved_at, document FROM ${kind.versions} WHERE ${kind.idColumn} = ? AND version = ?`).get(id, version)
    ) as { version: number; name: string; saved_at: string; document: string } | undefined;
    if (row === undefined) {
      if (version === undefined || !headExists(ctx, kind, id)) return noSuch(ctx, kind, id);
      const last = latestVersion(ctx, kind, id);
      return fail(`The ${kind.docField} with id ${id} has no version ${version as number}; its versions run from 1 to ${last}.`, 'version');
    }
    return ok({ id, version: row.version, name: row.name, savedAt: row.saved_at, document: decodeJson(row.document) });
  });
}

function latestVersion(ctx: StoreContext, kind: DocumentKind, id: number): number {
  return (ctx.db.prepare(`SELECT COALESCE(MAX(version), 0) AS v FROM ${kind.versions} WHERE ${kind.idColumn} = ?`).get(id) as { v: number }).v;
}

export function listDocuments(ctx: StoreContext, kind: DocumentKind): Checked<DocumentSummary[]> {
  return read(ctx, `list the saved ${kind.head}`, () => {
    const rows = ctx.db.prepare(
      `SELECT h.id, h.name, h.created_at, h.updated_at, MAX(v.version) AS latest
         FROM ${kind.head} h JOIN ${kind.versions} v ON v.${kind.idColumn} = h.id
        GROUP BY h.id
        ORDER BY h.updated_at DESC, h.id DESC`,
    ).all() as Array<{ id: number; name: string; created_at: string; updated_at: string; latest: number }>;
    return ok(rows.map((r) => ({ id: r.id, name: r.name, latestVersion: r.latest, createdAt: r.created_at, updatedAt: r.updated_at })));
  });
}

export function documentHistory(ctx: StoreContext, kind: DocumentKind, id: unknown): Checked<VersionEntry[]> {
  if (!isPositiveId(id)) return noSuch(ctx, kind, id);
  return read(ctx, `read the ${kind.docField}'s history`, () => {
    const rows = ctx.db.prepare(`SELECT version, name, saved_at FROM ${kind.versions} WHERE ${kind.idColumn} = ? ORDER BY version`).all(id) as Array<{ version: number; name: string; saved_at: string }>;
    if (rows.length === 0) return noSuch(ctx, kind, id);
    return ok(rows.map((r) => ({ version: r.version, name: r.name, savedAt: r.saved_at })));
  });
}
