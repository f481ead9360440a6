// Host services for the app: a folder listing (browser mode has no native file dialog, so the
// renderer browses through this), the native dialogs when the host has them, and the text of a
// memo written as HTML for the Memo screen's preview.

import { readFileSync, readdirSync, statSync } from 'node:fs';
import { basename, dirname, extname, join, resolve } from 'node:path';
import type { ApiResult, DialogAnswer, DialogArgs, FilesList, FilesListArgs, MemoPreview, MemoPreviewArgs } from '../contract/api.ts';
import { grantPicked, grantSaved, mayBrowse, readProblem, refuseIf } from './access.ts';
import { refuse } from './context.ts';
import type { HostContext } from './host.ts';

const SHOWN: Record<FilesListArgs['kind'], readonly string[]> = { study: ['.json'], data: ['.xlsx', '.xlsm', '.csv', '.txt'] };
const MAX_ENTRIES = 2000;
const MAX_MEMO_BYTES = 50 * 2 ** 20;

export async function listFolder(args: FilesListArgs, ctx: HostContext = {}): Promise<ApiResult<FilesList>> {
  const dir = resolve(args.dir);
  if (ctx.access && !mayBrowse(ctx.access, dir)) {
    return refuse([{ path: 'dir', message: `This window lists only the workspace's own folders and the folders of files you chose; ${dir} is neither. Use Open (or drop the file on the window) to bring in another file.` }]);
  }
  let names: string[];
  try {
    if (!statSync(dir).isDirectory()) return refuse([{ path: 'dir', message: `${dir} is a file, not a folder.` }]);
    names = readdirSync(dir);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    return refuse([{ path: 'dir', message: code === 'ENOENT' ? `There is no folder ${dir}. Check the spelling.` : `The folder ${dir} could not be opened (${code ?? 'read error'}).` }]);
  }
  const entries = names
    .filter((n) => !n.startsWith('.'))
    .flatMap((name) => {
      const path = join(dir, name);
      let isFolder = false;
      try { isFolder = statSync(path).isDirectory(); } catch { return []; }
      return isFolder || SHOWN[args.kind].includes(extname(name).toLowerCase()) ? [{ name, path, isFolder }] : [];
    })
    .sort((a, b) => Number(b.isFolder) - Number(a.isFolder) || a.name.localeCompare(b.name))
    .slice(0, MAX_ENTRIES);
  const parent = dirname(dir);
  return { ok: true, value: { dir, parent: parent === dir ? null : parent, entries } };
}

const NO_DIALOGS = 'This window has no file dialogs (browser mode): browse to the file, or type its full path.';

/** A dialog's starting place comes from the page: only a folder the page may already see. */
function defaultPathProblem(args: DialogArgs, ctx: HostContext): ApiResult<never> | null {
  if (args.defaultPath === undefined || !ctx.access) return null;
  const p = resolve(args.defaultPath);
  if (mayBrowse(ctx.access, p) || mayBrowse(ctx.access, dirname(p))) return null;
  return refuse([{ path: 'defaultPath', message: `The dialog may start only in the workspace's folders or beside a file you chose; ${p} is neither. Leave the starting place out.` }]);
}

export async function openDialog(args: DialogArgs, ctx: HostContext = {}): Promise<ApiResult<DialogAnswer>> {
  if (!ctx.dialogs) return refuse([{ path: '', message: NO_DIALOGS }]);
  const denied = defaultPathProblem(args, ctx);
  if (denied) return denied;
  const path = await ctx.dialogs.openFile(args);
  if (path && ctx.access) grantPicked(ctx.access, path, args.purpose);
  return { ok: true, value: { path } };
}

export async function saveDialog(args: DialogArgs, ctx: HostContext = {}): Promise<ApiResult<DialogAnswer>> {
  if (!ctx.dialogs) return refuse([{ path: '', message: NO_DIALOGS }]);
  const denied = defaultPathProblem(args, ctx);
  if (denied) return denied;
  const path = await ctx.dialogs.saveFile(args);
  if (path && ctx.access) grantSaved(ctx.access, path);
  return { ok: true, value: { path } };
}

/** The memo's HTML text, for a preview the renderer shows without scripts. Only .html files are read. */
export async function previewMemo(args: MemoPreviewArgs, ctx: HostContext = {}): Promise<ApiResult<MemoPreview>> {
  const path = resolve(args.path);
  const denied = refuseIf(readProblem(ctx, path, 'path'));
  if (denied) return denied;
  if (!/\.html?$/i.test(path)) return refuse([{ path: 'path', message: `${basename(path)} is not an HTML memo; the preview shows the .html memo a run wrote.` }]);
  try {
    const size = statSync(path).size;
    if (size > MAX_MEMO_BYTES) return refuse([{ path: 'path', message: `${basename(path)} is too large to preview (${Math.round(size / 2 ** 20)} MB); open it in a browser.` }]);
    return { ok: true, value: { path, html: readFileSync(path, 'utf8') } };
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    return refuse([{ path: 'path', message: code === 'ENOENT' ? `${basename(path)} was not found; run the study again to write the memo.` : `${basename(path)} could not be read (${code ?? 'read error'}).` }]);
  }
}
