// The memo's HTML shown inside the app: only its content, never its scripts, styles, frames or
// event handlers (the page's Content-Security-Policy would refuse them anyway). Works on any
// DOM-like document so it can be tested without a browser.

const DROP = new Set(['script', 'style', 'link', 'iframe', 'frame', 'object', 'embed', 'base', 'meta', 'form']);

interface ElementLike {
  tagName: string;
  attributes: ArrayLike<{ name: string; value: string }>;
  removeAttribute(name: string): void;
  remove(): void;
  querySelectorAll(selector: string): ArrayLike<ElementLike>;
}

/** Remove what may not run or load in the preview; returns how many elements were removed. */
export function cleanMemo(root: ElementLike): number {
  let removed = 0;
  const all = Array.from(root.querySelectorAll('*'));
  for (const el of all) {
    if (DROP.has(el.tagName.toLowerCase())) { el.remove(); removed++; continue; }
    for (const a of Array.from(el.attributes)) {
      const name = a.name.toLowerCase();
      const value = a.value.trim().toLowerCase();
      if (name.startsWith('on') || name === 'style' || ((name === 'href' || name === 'src') && !(value.startsWith('data:image/') || value.startsWith('#')))) el.removeAttribute(a.name);
    }
  }
  return removed;
}
