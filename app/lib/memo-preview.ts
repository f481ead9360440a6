// The memo's HTML shown inside the app: only its content, never its scripts, styles, forms, frames,
// event handlers or links out. Sanitized with DOMPurify (cure53), which follows the browser's own
// parser — so namespace tricks (SVG/MathML), mutation XSS and attributes a hand-written list misses
// (xlink:href, srcset, formaction) are handled — and run here in the renderer, where a DOM exists.
// The page's Content-Security-Policy (electron.config.ts) stays as a second layer.
//
// Why not a sandboxed iframe (sandbox="", srcdoc): the preview is part of the Memo screen, set in
// the app's own type and width and read by screen readers in its flow; an iframe needs its own
// sizing and a frame-src exception in a CSP that now says default-src 'none'.

import DOMPurify, { type Config } from 'dompurify';

/** Only the memo's content: no styles, forms or frames; links only within the memo; images only inline PNG/JPEG. */
export const MEMO_PURIFY_CONFIG: Config = {
  USE_PROFILES: { html: true },
  FORBID_TAGS: ['style', 'link', 'meta', 'base', 'form', 'input', 'button', 'textarea', 'select', 'iframe', 'frame', 'object', 'embed', 'svg', 'math'],
  FORBID_ATTR: ['style', 'srcset', 'formaction', 'action', 'ping', 'xlink:href', 'target'],
  ALLOWED_URI_REGEXP: /^(?:#|data:image\/(?:png|jpeg);base64,)/i,
  ALLOW_DATA_ATTR: false,
};

interface ElementLike { innerHTML: string }

/** Sanitize the memo held by `root` (a body parsed in an inert document) in place; returns how many elements were removed. */
export function cleanMemo(root: ElementLike): number {
  const purifier = DOMPurify();
  const clean = purifier.sanitize(root.innerHTML, MEMO_PURIFY_CONFIG) as unknown as string;
  root.innerHTML = clean;
  return purifier.removed.filter((r) => 'element' in r).length;
}
