// Boolean evaluation of the rule tree over atom truth values, two-valued (a point) and
// three-valued (a ball on which some atoms may change value). The three-valued form is
// Kleene's strong logic (S. C. Kleene, "Introduction to Metamathematics", 1952, §64): a
// determined result is correct whatever the unknown atoms turn out to be, so a unit whose
// tree is determined on its ball has an exactly known propensity.

import type { BoolNode } from './ir.ts';

/** Atom states for three-valued evaluation. */
export const FALSE = 0;
export const TRUE = 1;
export const UNKNOWN = 2;
export type Tri = typeof FALSE | typeof TRUE | typeof UNKNOWN;

export function evalTree(node: BoolNode, atoms: ArrayLike<number>): boolean {
  switch (node.t) {
    case 'atom':
      return atoms[node.i] === TRUE;
    case 'all':
      for (const c of node.c) if (!evalTree(c, atoms)) return false;
      return true;
    case 'any':
      for (const c of node.c) if (evalTree(c, atoms)) return true;
      return false;
    case 'atLeast': {
      let hits = 0;
      for (const c of node.c) if (evalTree(c, atoms) && ++hits >= node.k) return true;
      return false;
    }
    case 'not':
      return !evalTree(node.c, atoms);
  }
}

export function evalTree3(node: BoolNode, atoms: ArrayLike<number>): Tri {
  switch (node.t) {
    case 'atom':
      return atoms[node.i] as Tri;
    case 'all': {
      let unknown = false;
      for (const c of node.c) {
        const v = evalTree3(c, atoms);
        if (v === FALSE) return FALSE;
        if (v === UNKNOWN) unknown = true;
      }
      return unknown ? UNKNOWN : TRUE;
    }
    case 'any': {
      let unknown = false;
      for (const c of node.c) {
        const v = evalTree3(c, atoms);
        if (v === TRUE) return TRUE;
        if (v === UNKNOWN) unknown = true;
      }
      return unknown ? UNKNOWN : FALSE;
    }
    case 'atLeast': {
      let sure = 0;
      let maybe = 0;
      for (const c of node.c) {
        const v = evalTree3(c, atoms);
        if (v === TRUE) sure++;
        else if (v === UNKNOWN) maybe++;
      }
      if (sure >= node.k) return TRUE;
      if (sure + maybe < node.k) return FALSE;
      return UNKNOWN;
    }
    case 'not': {
      const v = evalTree3(node.c, atoms);
      return v === UNKNOWN ? UNKNOWN : v === TRUE ? FALSE : TRUE;
    }
  }
}
