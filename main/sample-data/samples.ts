// The sample programs shipped in sample-programs/, each with its seeded generator. The sizes
// and seeds here are the ones the committed files were written with (scripts/make-sample-data.ts).

import { apprenticeVoucherSample } from './apprentice-voucher.ts';
import { homeRepairSample } from './home-repair.ts';
import type { SampleFiles } from './sample-sheet.ts';
import { tutoringLotterySample } from './tutoring-lottery.ts';
import { winterCreditSample } from './winter-credit.ts';

export interface SampleProgram {
  folder: string;
  make: () => SampleFiles;
}

export const SAMPLE_PROGRAMS: readonly SampleProgram[] = [
  { folder: 'apprentice-voucher', make: () => apprenticeVoucherSample() },
  { folder: 'winter-credit', make: () => winterCreditSample() },
  { folder: 'home-repair', make: () => homeRepairSample() },
  { folder: 'tutoring-lottery', make: () => tutoringLotterySample() },
];
