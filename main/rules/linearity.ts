// Static structure of a lowered expression: does it involve a continuous variable, and is it
// affine in the continuous variables once every discrete variable is held fixed? This is what
// lets the propensity engine treat a criterion as a hyperplane (exact ball fractions) rather
// than simulate it. The classification is structural (it does not look at data), so it is
// conservative: `income * 0` is still called dependent on income.

import type { IrNode } from './ir.ts';

export function dependsOnContinuous(n: IrNode): boolean {
  switch (n.k) {
    case 'const':
    case 'disc':
      return false;
    case 'cont':
      return true;
    case 'neg':
      return dependsOnContinuous(n.a);
    case 'add':
    case 'sub':
    case 'mul':
    case 'div':
      return dependsOnContinuous(n.a) || dependsOnContinuous(n.b);
    case 'min':
    case 'max':
      return n.args.some(dependsOnContinuous);
    case 'lookup':
      return [...n.table.values()].some(dependsOnContinuous) || (n.otherwise !== null && dependsOnContinuous(n.otherwise));
  }
}

export function isAffineInContinuous(n: IrNode): boolean {
  switch (n.k) {
    case 'const':
    case 'disc':
    case 'cont':
      return true;
    case 'neg':
      return isAffineInContinuous(n.a);
    case 'add':
    case 'sub':
      return isAffineInContinuous(n.a) && isAffineInContinuous(n.b);
    case 'mul':
      // a product stays affine only when one factor is fixed within a discrete cell
      return isAffineInContinuous(n.a) && isAffineInContinuous(n.b) && (!dependsOnContinuous(n.a) || !dependsOnContinuous(n.b));
    case 'div':
      return isAffineInContinuous(n.a) && !dependsOnContinuous(n.b);
    case 'min':
    case 'max':
      // piecewise linear: affine only when no argument moves with a continuous variable
      return !n.args.some(dependsOnContinuous);
    case 'lookup':
      return [...n.table.values()].every(isAffineInContinuous) && (n.otherwise === null || isAffineInContinuous(n.otherwise));
  }
}
