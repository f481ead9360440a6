// Which variables a lowered expression reads: the rule's own knowledge, used where a criterion is
// shown with the inputs it depends on (the app's rule screen, "try a unit").

import type { CompiledProgram, IrNode } from './ir.ts';

/** Keys of the variables a lowered expression reads (lookups read their `by` variable too). */
export function keysIn(node: IrNode, p: CompiledProgram, out: Set<string>): Set<string> {
  switch (node.k) {
    case 'const': break;
    case 'cont': out.add(p.continuous[node.i]!.key); break;
    case 'disc': out.add(p.discrete[node.i]!.key); break;
    case 'neg': keysIn(node.a, p, out); break;
    case 'min': case 'max': for (const a of node.args) keysIn(a, p, out); break;
    case 'lookup':
      out.add(p.discrete[node.by]!.key);
      for (const b of node.table.values()) keysIn(b, p, out);
      if (node.otherwise) keysIn(node.otherwise, p, out);
      break;
    default: keysIn(node.a, p, out); keysIn(node.b, p, out);
  }
  return out;
}
