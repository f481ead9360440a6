// The study file (format 1, docs/study-format.md): what the CLI runs and the app saves and opens.
// Types only — shared by main/ and the renderer.

import type { Program } from '../rules/types.ts';

export interface JoinSource {
  /** Path relative to the study file. */
  path: string;
  /** The file's own name as the analyst picked it, when `path` is a stored copy (an upload in browser mode). */
  fileName?: string;
  sheet?: string;
  /** Column of this source holding the unit ID. */
  key: string;
  headerRow?: number;
}

export interface OutcomeColumn {
  column: string;
  label?: string;
}

export interface ListedIn {
  /** A source of `data.join` (by its path) whose IDs mark the units that received the benefit. */
  listedIn: string;
}

export interface StudyColumns {
  id: string;
  outcomes: OutcomeColumn[];
  treatment?: string | ListedIn;
  /** Report the effect per this many units of an amount-valued treatment (e.g. per 1,000). */
  treatmentPer?: number;
  decision?: string;
  cluster?: string;
  covariates?: string[];
  controls?: string[];
  /** Names the memo prints for columns that are not rule inputs (covariates, controls, cluster,
   * treatment, decision, ID), by column name: "BILL_BEFORE": "Monthly heating bill the winter before (USD)".
   * A column without one is printed by its name. Extension of format 1. */
  labels?: Record<string, string>;
}

export interface StudySettings {
  deltas: number[];
  draws: number;
  seed: number;
  /** Counts from 1 to this number are suppressed in every shared output (0 turns suppression off). */
  smallCellMax: number;
}

export interface StudyData {
  path: string;
  /** The file's own name as the analyst picked it, when `path` is a stored copy (an upload in browser mode). */
  fileName?: string;
  sheet?: string;
  headerRow?: number;
  join?: JoinSource[];
  /** Decimal mark of numbers written as text (default: found per column; "," reads 1.234,5 as 1234.5). */
  decimal?: ',' | '.';
  /** Columns that hold dates on purpose (a continuous rule input may hold dates only if listed). */
  dateColumns?: string[];
  /** A .csv read chunk by chunk through DuckDB (true) or whole (false); default by size. Parquet files are always streamed. */
  stream?: boolean;
}

/** A study after validation: the program resolved to an object, settings filled with defaults. */
export interface Study {
  fenceline: 1;
  title: string;
  description?: string;
  program: Program;
  /** Where the program came from when the study names a separate program file. */
  programPath?: string;
  data: StudyData;
  columns: StudyColumns;
  settings: StudySettings;
}

export const DEFAULT_SETTINGS: StudySettings = { deltas: [0.05, 0.1, 0.2], draws: 4000, seed: 1, smallCellMax: 10 };
